using System.Diagnostics;
using System.Runtime.InteropServices;

namespace IdentityQueue.Cli;

/// <summary>
/// SIGINT (Ctrl+C) and SIGTERM for a command that stops gracefully: the first signal cancels <see cref="Token"/> (the
/// command cancels its running trials, saves what was finished and exits within a few seconds); a second one ends the
/// process at once (a store's unfinished claims are then returned to pending by the next start or, on PostgreSQL, by the
/// other workers once the heartbeat is old). Dispose to restore the default handling.
/// </summary>
internal sealed class StopSignals : IDisposable
{
    private readonly CancellationTokenSource _stop = new();
    private readonly PosixSignalRegistration[] _registrations;
    private int _signals;

    public StopSignals(Action? onFirst = null)
    {
        _registrations =
        [
            PosixSignalRegistration.Create(PosixSignal.SIGINT, Handle),
            PosixSignalRegistration.Create(PosixSignal.SIGTERM, Handle),
        ];
        void Handle(PosixSignalContext context)
        {
            context.Cancel = true;
            if (Interlocked.Increment(ref _signals) == 1)
            {
                Console.Error.WriteLine($"idq: {context.Signal} received: stopping (cancelling running trials, saving what is finished); send it again to exit at once");
                onFirst?.Invoke();
                _stop.Cancel();
                return;
            }
            Console.Error.WriteLine($"idq: {context.Signal} received again: exiting at once");
            Console.Error.Flush();
            // Not Environment.Exit: its exit handlers wait for the graceful stop that is still running.
            Process.GetCurrentProcess().Kill();
        }
    }

    /// <summary>Cancelled by the first SIGINT or SIGTERM.</summary>
    public CancellationToken Token => _stop.Token;

    /// <summary>Whether a stop signal arrived.</summary>
    public bool Stopping => _stop.IsCancellationRequested;

    public void Dispose()
    {
        foreach (var r in _registrations) r.Dispose();
        _stop.Dispose();
    }
}
