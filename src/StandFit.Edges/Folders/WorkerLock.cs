namespace StandFit.Edges.Folders;

/// <summary>A second process already works under this worker identity.</summary>
public sealed class WorkerBusyException(string message, Exception inner) : IOException(message, inner);

/// <summary>
/// One process per worker identity and output folder: <c>output/journal/WORKER.lock</c>, opened
/// exclusively for the process's life (an advisory lock on Linux, a sharing lock on Windows). It
/// guards the worker's journal (one writer) and its claim folder. The lock goes with the process,
/// so a killed worker never leaves it behind.
/// </summary>
public sealed class WorkerLock : IDisposable
{
    private readonly FileStream _stream;

    private WorkerLock(FileStream stream) => _stream = stream;

    public static WorkerLock Acquire(string outputFolder, string workerId)
    {
        var folder = Path.Combine(outputFolder, "journal");
        Directory.CreateDirectory(folder);
        var path = Path.Combine(folder, workerId + ".lock");
        try
        {
            return new WorkerLock(new FileStream(path, FileMode.OpenOrCreate, FileAccess.ReadWrite, FileShare.None));
        }
        catch (IOException e)
        {
            throw new WorkerBusyException($"Another process works as worker '{workerId}' on {outputFolder} (its lock {path} is held). Stop it, or give this one its own 'watch.worker_id'.", e);
        }
    }

    public void Dispose() => _stream.Dispose();
}
