namespace SenseSplit.Cli;

/// <summary>Where a command writes: machine-readable results to <see cref="Out"/>, progress and warnings to <see cref="Err"/>.</summary>
public sealed class CliContext(TextWriter output, TextWriter error)
{
    public TextWriter Out { get; } = output;
    public TextWriter Err { get; } = error;
    public bool Verbose { get; set; }

    public void Warn(string message) => Err.WriteLine($"warning: {message}");
}

/// <summary>A failure the user can fix: bad input, a missing file. Carries the exit code to return.</summary>
public sealed class UserFacingException(string message, int exitCode = ExitCodes.BadInput) : Exception(message)
{
    public int ExitCode { get; } = exitCode;
}
