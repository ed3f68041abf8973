using Serilog;
using Serilog.Core;
using Serilog.Formatting.Compact;

namespace ShuntSweep.Instruments;

/// <summary>The traffic log: every command and response of every instrument, one JSON object per line with its timestamp.</summary>
/// <remarks>Each event carries <c>Resource</c>, the message template (<c>tx {Text}</c>, <c>rx {Text} after {ElapsedMs} ms</c>, warnings for discarded late answers and reconnects).</remarks>
public static class TrafficLog
{
    /// <summary>Creates a logger writing compact JSON lines (CLEF) to <paramref name="path"/>; dispose it to flush.</summary>
    public static Logger Create(string path)
    {
        ArgumentException.ThrowIfNullOrEmpty(path);
        var directory = Path.GetDirectoryName(Path.GetFullPath(path));
        if (directory is not null)
        {
            Directory.CreateDirectory(directory);
        }

        return new LoggerConfiguration()
            .MinimumLevel.Debug()
            .WriteTo.File(new CompactJsonFormatter(), path, buffered: false)
            .CreateLogger();
    }
}
