namespace ShuntSweep.Simulation.Scpi;

/// <summary>The standard SCPI-99 error codes and messages the simulated instruments queue.</summary>
/// <remarks>Codes and texts as listed in SCPI-99 vol. 2 §21.8 (copied via j123b567/scpi-parser libscpi/inc/scpi/error.h).</remarks>
internal static class ScpiErrors
{
    public const int NoError = 0;
    public const int CommandError = -100;
    public const int InvalidCharacter = -101;
    public const int SyntaxError = -102;
    public const int InvalidSeparator = -103;
    public const int DataTypeError = -104;
    public const int ParameterNotAllowed = -108;
    public const int MissingParameter = -109;
    public const int ProgramMnemonicTooLong = -112;
    public const int UndefinedHeader = -113;
    public const int HeaderSuffixOutOfRange = -114;
    public const int InvalidCharacterInNumber = -121;
    public const int ExponentTooLarge = -123;
    public const int InvalidSuffix = -131;
    public const int SuffixNotAllowed = -138;
    public const int InvalidStringData = -151;
    public const int BlockDataNotAllowed = -168;
    public const int ExecutionError = -200;
    public const int SettingsConflict = -221;
    public const int DataOutOfRange = -222;
    public const int IllegalParameterValue = -224;
    public const int HardwareError = -240;
    public const int SystemError = -310;
    public const int QueueOverflow = -350;
    public const int InputBufferOverrun = -363;
    public const int QueryError = -400;

    private static readonly Dictionary<int, string> Messages = new()
    {
        [0] = "No error",
        [-100] = "Command error",
        [-101] = "Invalid character",
        [-102] = "Syntax error",
        [-103] = "Invalid separator",
        [-104] = "Data type error",
        [-108] = "Parameter not allowed",
        [-109] = "Missing parameter",
        [-112] = "Program mnemonic too long",
        [-113] = "Undefined header",
        [-114] = "Header suffix out of range",
        [-120] = "Numeric data error",
        [-121] = "Invalid character in number",
        [-123] = "Exponent too large",
        [-131] = "Invalid suffix",
        [-138] = "Suffix not allowed",
        [-151] = "Invalid string data",
        [-168] = "Block data not allowed",
        [-200] = "Execution error",
        [-221] = "Settings conflict",
        [-222] = "Data out of range",
        [-224] = "Illegal parameter value",
        [-240] = "Hardware error",
        [-300] = "Device specific error",
        [-310] = "System error",
        [-350] = "Queue overflow",
        [-363] = "Input buffer overrun",
        [-400] = "Query error",
    };

    /// <summary>The standard message of <paramref name="code"/> (the class message when the exact code is not listed).</summary>
    public static string Message(int code) =>
        Messages.TryGetValue(code, out var m) ? m
        : Messages.TryGetValue(code / 100 * 100, out var c) ? c
        : "Device specific error";

    /// <summary>True when <paramref name="code"/> is a standard code this table knows.</summary>
    public static bool IsKnown(int code) => Messages.ContainsKey(code);

    /// <summary>The <c>SYSTem:ERRor?</c> answer: <c>code,"message[;detail]"</c>.</summary>
    public static string Format(int code, string? detail)
    {
        var text = detail is null ? Message(code) : $"{Message(code)};{detail}";
        return $"{code},\"{text.Replace("\"", "'", StringComparison.Ordinal)}\"";
    }

    /// <summary>The Standard Event Status Register bit an error sets (IEEE 488.2 §11.5.1: CME, EXE, DDE, QYE).</summary>
    public static int EsrBit(int code) => code switch
    {
        <= -100 and > -200 => StatusBits.CommandError,
        <= -200 and > -300 => StatusBits.ExecutionError,
        <= -300 and > -400 => StatusBits.DeviceError,
        <= -400 and > -500 => StatusBits.QueryError,
        _ => 0,
    };
}

/// <summary>IEEE 488.2 status register bit values.</summary>
internal static class StatusBits
{
    // Standard Event Status Register (IEEE 488.2 §11.5.1.1).
    public const int OperationComplete = 0x01;
    public const int QueryError = 0x04;
    public const int DeviceError = 0x08;
    public const int ExecutionError = 0x10;
    public const int CommandError = 0x20;
    public const int PowerOn = 0x80;

    // Status Byte (IEEE 488.2 §11.2; SCPI-99 adds bit 2 error queue and bit 3 questionable summary).
    public const int ErrorQueueNotEmpty = 0x04;
    public const int QuestionableSummary = 0x08;
    public const int MessageAvailable = 0x10;
    public const int EventSummary = 0x20;
    public const int MasterSummary = 0x40;
}
