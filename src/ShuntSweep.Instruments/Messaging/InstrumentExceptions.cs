namespace ShuntSweep.Instruments.Messaging;

/// <summary>Something went wrong talking to an instrument; the message names the resource and what was being done.</summary>
public class InstrumentException : Exception
{
    /// <summary>Creates an error for <paramref name="resource"/>.</summary>
    public InstrumentException(string resource, string message, Exception? inner = null)
        : base($"{resource}: {message}", inner)
    {
        Resource = resource;
        Problem = message;
    }

    /// <summary>The resource string of the instrument.</summary>
    public string Resource { get; }

    /// <summary>What went wrong, without the resource string.</summary>
    public string Problem { get; }
}

/// <summary>The instrument did not answer (or did not accept a command) within the allowed time.</summary>
public sealed class InstrumentTimeoutException(string resource, string message, TimeSpan timeout)
    : InstrumentException(resource, message)
{
    /// <summary>The timeout that ran out.</summary>
    public TimeSpan Timeout { get; } = timeout;
}

/// <summary>The instrument missed an answer and then did not answer when its configuration was re-sent after reconnecting: it is taken as hung and
/// not tried again, so that the run's safe-off starts seconds sooner.</summary>
public sealed class InstrumentUnresponsiveException(string resource, string message, Exception? inner = null)
    : InstrumentException(resource, message, inner);

/// <summary>The connection to the instrument was lost or could not be made.</summary>
public sealed class InstrumentConnectionException(string resource, string message, Exception? inner = null)
    : InstrumentException(resource, message, inner);

/// <summary>The instrument answered something that does not follow IEEE 488.2 / SCPI (garbage, a truncated block, a number that is not one).</summary>
public sealed class InstrumentProtocolException(string resource, string message, Exception? inner = null)
    : InstrumentException(resource, message, inner);

/// <summary>One entry of an instrument's error queue (SCPI-99 <c>SYSTem:ERRor?</c>: a code and its message).</summary>
/// <param name="Code">The SCPI error code: negative codes are defined by SCPI-99, positive ones by the maker; 0 means no error.</param>
/// <param name="Message">The error's text without quotes.</param>
public sealed record InstrumentError(int Code, string Message)
{
    /// <inheritdoc />
    public override string ToString() => $"{Code},\"{Message}\"";
}

/// <summary>The instrument reported errors in its error queue after a command; carries the first code and every entry read.</summary>
public sealed class InstrumentErrorException : InstrumentException
{
    /// <summary>Creates the error from the entries drained from the queue (at least one).</summary>
    public InstrumentErrorException(string resource, string context, IReadOnlyList<InstrumentError> errors)
        : base(resource, $"{context}: the instrument reported {string.Join("; ", errors)}")
    {
        ArgumentOutOfRangeException.ThrowIfZero(errors.Count);
        Errors = errors;
    }

    /// <summary>The code of the first error (SCPI-99 chapter 21: -100…-199 command, -200…-299 execution, -300…-399 device, -400…-499 query errors).</summary>
    public int Code => Errors[0].Code;

    /// <summary>The message of the first error.</summary>
    public string ErrorMessage => Errors[0].Message;

    /// <summary>Every entry drained from the queue, oldest first.</summary>
    public IReadOnlyList<InstrumentError> Errors { get; }
}
