namespace Spatial.Regression.Internal;

/// <summary>
/// Double-double arithmetic: an unevaluated sum hi + lo of two doubles with |lo| ≤ ulp(hi)/2, about 32
/// significant decimal digits. Error-free transformations after Dekker (1971) and Knuth (TwoSum); the
/// product uses the fused multiply-add for the exact low part.
/// </summary>
internal readonly record struct DoubleDouble(double Hi, double Lo)
{
    public static readonly DoubleDouble Zero = new(0, 0);

    public static implicit operator DoubleDouble(double x) => new(x, 0);

    public double ToDouble() => Hi + Lo;

    /// <summary>Exact sum of two doubles as a double-double (Knuth TwoSum).</summary>
    public static DoubleDouble TwoSum(double a, double b)
    {
        var s = a + b;
        var bb = s - a;
        var err = (a - (s - bb)) + (b - bb);
        return new(s, err);
    }

    /// <summary>Exact product of two doubles as a double-double (FMA).</summary>
    public static DoubleDouble TwoProduct(double a, double b)
    {
        var p = a * b;
        var err = Math.FusedMultiplyAdd(a, b, -p);
        return new(p, err);
    }

    private static DoubleDouble QuickTwoSum(double a, double b)
    {
        var s = a + b;
        return new(s, b - (s - a));
    }

    public static DoubleDouble operator +(DoubleDouble a, DoubleDouble b)
    {
        var s = TwoSum(a.Hi, b.Hi);
        var t = TwoSum(a.Lo, b.Lo);
        var lo = s.Lo + t.Hi;
        var r = QuickTwoSum(s.Hi, lo);
        return QuickTwoSum(r.Hi, r.Lo + t.Lo);
    }

    public static DoubleDouble operator -(DoubleDouble a) => new(-a.Hi, -a.Lo);

    public static DoubleDouble operator -(DoubleDouble a, DoubleDouble b) => a + (-b);

    public static DoubleDouble operator *(DoubleDouble a, DoubleDouble b)
    {
        var p = TwoProduct(a.Hi, b.Hi);
        var lo = p.Lo + ((a.Hi * b.Lo) + (a.Lo * b.Hi));
        return QuickTwoSum(p.Hi, lo);
    }

    public static DoubleDouble operator /(DoubleDouble a, DoubleDouble b)
    {
        var q1 = a.Hi / b.Hi;
        var r = a - (b * q1);
        var q2 = r.Hi / b.Hi;
        r -= b * q2;
        var q3 = r.Hi / b.Hi;
        var q = QuickTwoSum(q1, q2);
        return q + q3;
    }

    /// <summary>a·b + c with one rounding of the double-double kind (used in inner loops).</summary>
    public static DoubleDouble MultiplyAdd(DoubleDouble a, DoubleDouble b, DoubleDouble c) => (a * b) + c;

    public static DoubleDouble Sqrt(DoubleDouble a)
    {
        if (a.Hi <= 0)
        {
            return Zero;
        }

        var x = Math.Sqrt(a.Hi);
        var xx = TwoProduct(x, x);
        var corr = ((a - xx).Hi) / (2 * x);
        return TwoSum(x, corr);
    }

    /// <summary>
    /// Parses invariant decimal text (sign, digits, optional point, optional exponent) to double-double, keeping
    /// up to 31 significant digits: the digits are accumulated exactly and scaled by a power of ten computed in
    /// double-double (relative error about 1e-31). Returns false for anything else (including NaN and infinities).
    /// </summary>
    public static bool TryParse(ReadOnlySpan<char> text, out DoubleDouble value)
    {
        value = Zero;
        text = text.Trim();
        var i = 0;
        var negative = false;
        if (i < text.Length && (text[i] == '+' || text[i] == '-'))
        {
            negative = text[i] == '-';
            i++;
        }

        var mantissa = Zero;
        var digits = 0;
        var significant = 0;
        var exponent = 0;
        var seenPoint = false;
        for (; i < text.Length; i++)
        {
            var ch = text[i];
            if (ch >= '0' && ch <= '9')
            {
                digits++;
                if (significant < 31 && (significant > 0 || ch != '0'))
                {
                    mantissa = (mantissa * 10.0) + (double)(ch - '0');
                    significant++;
                    if (seenPoint)
                    {
                        exponent--;
                    }
                }
                else if (significant > 0 || ch == '0')
                {
                    if (!seenPoint && significant >= 31)
                    {
                        exponent++;
                    }
                    else if (seenPoint && significant == 0)
                    {
                        exponent--;
                    }
                }
            }
            else if (ch == '.' && !seenPoint)
            {
                seenPoint = true;
            }
            else
            {
                break;
            }
        }

        if (digits == 0)
        {
            return false;
        }

        if (i < text.Length)
        {
            if (text[i] != 'e' && text[i] != 'E')
            {
                return false;
            }

            if (!int.TryParse(text[(i + 1)..], System.Globalization.NumberStyles.AllowLeadingSign, System.Globalization.CultureInfo.InvariantCulture, out var e) || Math.Abs(e) > 300)
            {
                return false;
            }

            exponent += e;
        }

        var scale = PowerOfTen(Math.Abs(exponent));
        value = exponent >= 0 ? mantissa * scale : mantissa / scale;
        if (negative)
        {
            value = -value;
        }

        return double.IsFinite(value.Hi);
    }

    private static DoubleDouble PowerOfTen(int k)
    {
        var result = new DoubleDouble(1.0, 0);
        var b = new DoubleDouble(10.0, 0);
        while (k > 0)
        {
            if ((k & 1) == 1)
            {
                result *= b;
            }

            b *= b;
            k >>= 1;
        }

        return result;
    }

    public static DoubleDouble Abs(DoubleDouble a) => a.Hi < 0 || (a.Hi == 0 && a.Lo < 0) ? -a : a;
}
