namespace Spatial.Cli;

/// <summary>Exit codes of the <c>spatial</c> command (documented in the README).</summary>
public static class ExitCodes
{
    /// <summary>Done.</summary>
    public const int Done = 0;

    /// <summary>Bad input: a file could not be read or its data could not be used.</summary>
    public const int BadInput = 1;

    /// <summary>Bad usage: unknown verb or option, missing or malformed argument.</summary>
    public const int BadUsage = 2;

    /// <summary>Internal fault: a bug in Spatial; please report it with the <c>--debug</c> output.</summary>
    public const int InternalFault = 3;

    /// <summary>Stopped by the user (Ctrl-C).</summary>
    public const int Cancelled = 130;
}

/// <summary>Thrown by a verb for a usage error found after parsing (conflicting options, a bad option value).</summary>
public sealed class UsageException : Exception
{
    /// <summary>Creates the exception.</summary>
    public UsageException(string message)
        : base(message)
    {
    }

    /// <summary>Creates the exception.</summary>
    public UsageException()
    {
    }

    /// <summary>Creates the exception.</summary>
    public UsageException(string message, Exception innerException)
        : base(message, innerException)
    {
    }
}
