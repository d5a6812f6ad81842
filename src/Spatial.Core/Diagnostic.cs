namespace Spatial.Core;

/// <summary>How serious a <see cref="Diagnostic"/> is.</summary>
public enum Severity
{
    /// <summary>Worth knowing; nothing was lost.</summary>
    Info,

    /// <summary>Some data were skipped or left unknown; the run goes on.</summary>
    Warning,

    /// <summary>The input cannot be used; the run stops.</summary>
    Error,
}

/// <summary>
/// A located message about input data: which file, which line (1-based; 0 when not about a line) and
/// column (1-based; 0 when unknown), what was wrong, and what to do.
/// </summary>
public sealed record Diagnostic(Severity Severity, string File, long Line, int Column, string Message, string Hint)
{
    /// <summary>An error about a line of a file.</summary>
    public static Diagnostic Error(string file, long line, string message, string hint, int column = 0) =>
        new(Severity.Error, file, line, column, message, hint);

    /// <summary>A warning about a line of a file.</summary>
    public static Diagnostic Warning(string file, long line, string message, string hint = "", int column = 0) =>
        new(Severity.Warning, file, line, column, message, hint);

    /// <summary>One line: <c>FILE:LINE[:COL]: MESSAGE; HINT</c>.</summary>
    public override string ToString()
    {
        var where = Line > 0 ? (Column > 0 ? $"{File}:{Line}:{Column}" : $"{File}:{Line}") : File;
        var text = string.IsNullOrEmpty(Hint) ? Message : $"{Message}; {Hint}";
        return $"{where}: {text}";
    }
}

/// <summary>
/// Thrown when input data cannot be used. Carries the located <see cref="Diagnostic"/>; the command
/// line prints it as one line and exits with code 1.
/// </summary>
public sealed class SpatialDataException : Exception
{
    /// <summary>Creates the exception for <paramref name="diagnostic"/>.</summary>
    public SpatialDataException(Diagnostic diagnostic)
        : base(diagnostic?.ToString())
    {
        ArgumentNullException.ThrowIfNull(diagnostic);
        Diagnostic = diagnostic;
    }

    /// <summary>Creates the exception for an error at <paramref name="file"/>:<paramref name="line"/>.</summary>
    public SpatialDataException(string file, long line, string message, string hint, int column = 0)
        : this(Diagnostic.Error(file, line, message, hint, column))
    {
    }

    /// <summary>Not for use: a data error always has a location.</summary>
    public SpatialDataException()
        : this(Diagnostic.Error("(unknown)", 0, "bad input", string.Empty))
    {
    }

    /// <summary>Not for use: a data error always has a location.</summary>
    public SpatialDataException(string message)
        : this(Diagnostic.Error("(unknown)", 0, message, string.Empty))
    {
    }

    /// <summary>Not for use: a data error always has a location.</summary>
    public SpatialDataException(string message, Exception innerException)
        : base(message, innerException)
    {
        Diagnostic = Diagnostic.Error("(unknown)", 0, message, string.Empty);
    }

    /// <summary>What was wrong and where.</summary>
    public Diagnostic Diagnostic { get; }
}

/// <summary>Thrown when a numerical method fails to converge or meets a singular problem it cannot handle.</summary>
public sealed class NumericalException : Exception
{
    /// <summary>Creates the exception.</summary>
    public NumericalException()
    {
    }

    /// <summary>Creates the exception with a message.</summary>
    public NumericalException(string message)
        : base(message)
    {
    }

    /// <summary>Creates the exception with a message and cause.</summary>
    public NumericalException(string message, Exception innerException)
        : base(message, innerException)
    {
    }
}
