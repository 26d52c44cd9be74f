using System.Runtime.InteropServices;

namespace SenseSplit.Cli;

/// <summary>
/// Turns the first Ctrl-C (SIGINT) or SIGTERM during a long command into a cancellation of <see cref="Token"/>, so
/// the command can stop at its next check and clean up (no half-written output). A second signal is left to the
/// default handler and ends the process at once. Dispose to unregister.
/// </summary>
public sealed class ProgressInterrupt : IDisposable
{
    private readonly CancellationTokenSource _cts;
    private readonly List<PosixSignalRegistration> _registrations = [];

    public ProgressInterrupt(CancellationToken outer = default)
    {
        _cts = CancellationTokenSource.CreateLinkedTokenSource(outer);
        foreach (var signal in new[] { PosixSignal.SIGINT, PosixSignal.SIGTERM })
        {
            try { _registrations.Add(PosixSignalRegistration.Create(signal, OnSignal)); }
            catch (PlatformNotSupportedException) { }
        }
    }

    public CancellationToken Token => _cts.Token;

    private void OnSignal(PosixSignalContext context)
    {
        if (_cts.IsCancellationRequested) return; // second signal: let the default handling end the process
        context.Cancel = true;
        _cts.Cancel();
    }

    public void Dispose()
    {
        foreach (var r in _registrations) r.Dispose();
        _cts.Dispose();
    }
}
