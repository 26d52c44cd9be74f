namespace SenseSplit.Cli;

/// <summary>Every exit code the tool returns, in one place.</summary>
public static class ExitCodes
{
    public const int Ok = 0;
    /// <summary>The command line itself is wrong (unknown option, missing value).</summary>
    public const int Usage = 2;
    /// <summary>An input file is missing, unreadable or malformed.</summary>
    public const int BadInput = 3;
    /// <summary>An output could not be written.</summary>
    public const int WriteFailed = 4;
    /// <summary>The merge test ran and the embedding failed it.</summary>
    public const int MergeTestFailed = 5;
    /// <summary>Interrupted by the user.</summary>
    public const int Cancelled = 130;
    /// <summary>An unexpected internal error.</summary>
    public const int Internal = 70;
}
