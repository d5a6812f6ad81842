using Xunit;

namespace Spatial.Testing;

/// <summary>Asserts with named tolerances and expected-first arguments.</summary>
public static class Tolerance
{
    /// <summary>Asserts |expected − actual| ≤ absolute, naming <paramref name="what"/> in the failure.</summary>
    public static void Near(double expected, double actual, double absolute, string what)
    {
        if (double.IsNaN(expected) && double.IsNaN(actual))
        {
            return;
        }

        Assert.True(Math.Abs(expected - actual) <= absolute, $"{what}: expected {expected:R}, got {actual:R} (tolerance {absolute:R}, off by {Math.Abs(expected - actual):R})");
    }

    /// <summary>Asserts |expected − actual| ≤ relative·|expected|.</summary>
    public static void Relative(double expected, double actual, double relative, string what) =>
        Near(expected, actual, Math.Abs(expected) * relative, what);

    /// <summary>
    /// Log relative error as NIST StRD defines it: −log10(|actual − expected| / |expected|), or
    /// −log10|actual| when expected is 0; capped at 15 when the two agree exactly.
    /// </summary>
    public static double LogRelativeError(double expected, double actual)
    {
        var diff = Math.Abs(actual - expected);
        if (diff == 0)
        {
            return 15;
        }

        return expected == 0 ? -Math.Log10(diff) : -Math.Log10(diff / Math.Abs(expected));
    }

    /// <summary>Asserts at least <paramref name="digits"/> correct significant digits (NIST log relative error).</summary>
    public static void Digits(double expected, double actual, double digits, string what)
    {
        var lre = LogRelativeError(expected, actual);
        Assert.True(lre >= digits, $"{what}: expected {expected:R}, got {actual:R}: {lre:F2} correct digits, need {digits}");
    }
}
