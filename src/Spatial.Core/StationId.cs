namespace Spatial.Core;

/// <summary>
/// A station identifier as written in the station list: 1–64 characters, no control characters,
/// no leading or trailing white space. Compared ordinally (case-sensitive).
/// </summary>
public readonly record struct StationId : IComparable<StationId>
{
    /// <summary>Longest identifier accepted.</summary>
    public const int MaxLength = 64;

    /// <summary>Creates an identifier; throws <see cref="ArgumentException"/> when <paramref name="value"/> is not a valid id.</summary>
    public StationId(string value)
    {
        if (!IsValid(value, out var why))
        {
            throw new ArgumentException($"'{value}' is not a station id: {why}.", nameof(value));
        }

        Value = value;
    }

    /// <summary>The identifier text.</summary>
    public string Value { get; }

    /// <summary>True when <paramref name="value"/> can be a station id; otherwise <paramref name="why"/> says what is wrong.</summary>
    public static bool IsValid(string? value, out string why)
    {
        if (string.IsNullOrEmpty(value))
        {
            why = "it is empty";
            return false;
        }

        if (value.Length > MaxLength)
        {
            why = $"it is longer than {MaxLength} characters";
            return false;
        }

        if (char.IsWhiteSpace(value[0]) || char.IsWhiteSpace(value[^1]))
        {
            why = "it starts or ends with white space";
            return false;
        }

        foreach (var c in value)
        {
            if (char.IsControl(c))
            {
                why = "it holds a control character";
                return false;
            }
        }

        why = string.Empty;
        return true;
    }

    /// <inheritdoc />
    public int CompareTo(StationId other) => string.CompareOrdinal(Value, other.Value);

    /// <summary>Ordinal order.</summary>
    public static bool operator <(StationId left, StationId right) => left.CompareTo(right) < 0;

    /// <summary>Ordinal order.</summary>
    public static bool operator <=(StationId left, StationId right) => left.CompareTo(right) <= 0;

    /// <summary>Ordinal order.</summary>
    public static bool operator >(StationId left, StationId right) => left.CompareTo(right) > 0;

    /// <summary>Ordinal order.</summary>
    public static bool operator >=(StationId left, StationId right) => left.CompareTo(right) >= 0;

    /// <inheritdoc />
    public override string ToString() => Value ?? string.Empty;
}
