using IdentityQueue.Algebra;

namespace IdentityQueue.Worker;

/// <summary>
/// An exclusive lock on a file beside a SQLite store, held for the life of a worker process: SQLite's queue storage is
/// not safe across processes, so a second worker on the same store is refused. The operating system releases the lock
/// when the process ends, also when it is killed.
/// </summary>
public sealed class StoreLock : IDisposable
{
    private readonly FileStream _stream;

    private StoreLock(FileStream stream) => _stream = stream;

    public static string PathFor(string storePath) => storePath + ".worker-lock";

    /// <summary>The lock, or the reason when another process holds it.</summary>
    public static Result<StoreLock> TryAcquire(string storePath)
    {
        var path = PathFor(storePath);
        try
        {
            var stream = new FileStream(path, FileMode.OpenOrCreate, FileAccess.ReadWrite, FileShare.None);
            stream.SetLength(0);
            using (var w = new StreamWriter(stream, leaveOpen: true)) w.Write($"{Environment.MachineName}:{Environment.ProcessId}");
            stream.Flush();
            return Result<StoreLock>.Ok(new StoreLock(stream));
        }
        catch (IOException)
        {
            var holder = "";
            try { holder = File.ReadAllText(path); } catch (IOException) { }
            return Result<StoreLock>.Fail($"another worker ({(holder.Length > 0 ? holder : "unknown process")}) is already screening the store {storePath}; " +
                "a SQLite store takes one worker process (use --workers N for more threads, or PostgreSQL for several processes)");
        }
    }

    public void Dispose() => _stream.Dispose();
}
