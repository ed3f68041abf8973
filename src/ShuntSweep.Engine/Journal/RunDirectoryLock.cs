using System.Diagnostics;
using System.Globalization;

namespace ShuntSweep.Engine.Journal;

/// <summary>The one writer of a run directory: an exclusive lock held for the life of a run, so that a second process cannot interleave the journal or the events.</summary>
/// <remarks>The lock is the operating system's (released when the process dies, even by kill -9); the holder's process id is kept beside it so that a refusal can name it.</remarks>
public sealed class RunDirectoryLock : IDisposable
{
    /// <summary>The lock file's name inside a run directory.</summary>
    public const string FileName = "run.lock";

    /// <summary>The file beside it that names the holder.</summary>
    public const string OwnerFileName = "run.lock.owner";

    private readonly FileStream _lock;
    private readonly string _ownerPath;

    private RunDirectoryLock(FileStream stream, string ownerPath, int? previousOwner)
    {
        _lock = stream;
        _ownerPath = ownerPath;
        TakenOverFrom = previousOwner;
    }

    /// <summary>The process id of a holder that died without releasing the lock file, when this lock took it over.</summary>
    public int? TakenOverFrom { get; }

    /// <summary>Takes the lock of <paramref name="directory"/>; throws <see cref="RunDirectoryBusyException"/> naming the holder when another process has it.</summary>
    public static RunDirectoryLock Acquire(string directory)
    {
        Directory.CreateDirectory(directory);
        var ownerPath = Path.Combine(directory, OwnerFileName);
        FileStream stream;
        try
        {
            stream = new FileStream(Path.Combine(directory, FileName), FileMode.OpenOrCreate, FileAccess.ReadWrite, FileShare.None);
        }
        catch (IOException ex)
        {
            throw new RunDirectoryBusyException(directory, ReadOwner(ownerPath), ex);
        }

        var previous = ReadOwner(ownerPath);
        var self = Environment.ProcessId;
        File.WriteAllText(ownerPath, self.ToString(CultureInfo.InvariantCulture) + "\n");
        return new RunDirectoryLock(stream, ownerPath, previous is { } p && p != self ? p : null);
    }

    /// <inheritdoc />
    public void Dispose()
    {
        File.Delete(_ownerPath);
        _lock.Dispose();
    }

    private static int? ReadOwner(string ownerPath)
    {
        try
        {
            return int.TryParse(File.ReadAllText(ownerPath).Trim(), NumberStyles.None, CultureInfo.InvariantCulture, out var pid) ? pid : null;
        }
        catch (IOException)
        {
            return null;
        }
    }
}

/// <summary>Another process holds the run directory.</summary>
public sealed class RunDirectoryBusyException(string directory, int? owner, Exception inner)
    : Exception($"{directory} is in use by another shuntsweep process{(owner is { } p ? $" (process id {p}{(IsRunning(p) ? string.Empty : ", which seems to have ended")})" : string.Empty)}; wait for it to finish or stop it first.", inner)
{
    /// <summary>The holder's process id, when it is known.</summary>
    public int? Owner { get; } = owner;

    private static bool IsRunning(int pid)
    {
        try
        {
            using var p = Process.GetProcessById(pid);
            return !p.HasExited;
        }
        catch (ArgumentException)
        {
            return false;
        }
    }
}
