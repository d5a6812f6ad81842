namespace Spatial.Scenario.Internal;

/// <summary>
/// A small seeded pseudo-random generator: xoshiro256** (Blackman &amp; Vigna 2018) seeded through
/// SplitMix64, with uniform, normal (Marsaglia polar method) and gamma (Marsaglia &amp; Tsang 2000)
/// draws. Its sequence depends only on the seed, never on the platform or runtime.
/// </summary>
internal sealed class Rng
{
    private ulong s0;
    private ulong s1;
    private ulong s2;
    private ulong s3;
    private double spare;
    private bool hasSpare;

    /// <summary>A generator whose state is derived from <paramref name="seed"/>.</summary>
    public Rng(ulong seed)
    {
        var x = seed;
        s0 = SplitMix(ref x);
        s1 = SplitMix(ref x);
        s2 = SplitMix(ref x);
        s3 = SplitMix(ref x);
    }

    /// <summary>Derives a stream seed from a master seed and labels (SplitMix64 finaliser chained over the parts).</summary>
    public static ulong Derive(ulong seed, params ulong[] parts)
    {
        var h = Finalise(seed ^ 0x9E3779B97F4A7C15UL);
        foreach (var p in parts)
        {
            h = Finalise(h ^ Finalise(p + 0x632BE59BD9B4E019UL));
        }

        return h;
    }

    /// <summary>The next 64 random bits.</summary>
    public ulong NextULong()
    {
        var result = RotateLeft(s1 * 5, 7) * 9;
        var t = s1 << 17;
        s2 ^= s0;
        s3 ^= s1;
        s1 ^= s2;
        s0 ^= s3;
        s2 ^= t;
        s3 = RotateLeft(s3, 45);
        return result;
    }

    /// <summary>Uniform on [0, 1) with 53 random bits.</summary>
    public double NextDouble() => (NextULong() >> 11) * (1.0 / (1UL << 53));

    /// <summary>Uniform on [lo, hi).</summary>
    public double Uniform(double lo, double hi) => lo + ((hi - lo) * NextDouble());

    /// <summary>Uniform integer on [0, n).</summary>
    public int NextInt(int n)
    {
        ArgumentOutOfRangeException.ThrowIfNegativeOrZero(n);
        return (int)((NextULong() >> 33) % (ulong)n);
    }

    /// <summary>Standard normal draw (Marsaglia polar method; the second value of each pair is kept for the next call).</summary>
    public double Normal()
    {
        if (hasSpare)
        {
            hasSpare = false;
            return spare;
        }

        double u;
        double v;
        double s;
        do
        {
            u = (2 * NextDouble()) - 1;
            v = (2 * NextDouble()) - 1;
            s = (u * u) + (v * v);
        }
        while (s >= 1 || s == 0);

        var f = Math.Sqrt(-2 * Math.Log(s) / s);
        spare = v * f;
        hasSpare = true;
        return u * f;
    }

    /// <summary>
    /// Gamma draw with shape <paramref name="shape"/> and unit scale (Marsaglia &amp; Tsang 2000; for shape &lt; 1 the
    /// boost G(shape+1)·U^(1/shape)).
    /// </summary>
    public double Gamma(double shape)
    {
        ArgumentOutOfRangeException.ThrowIfNegativeOrZero(shape);
        if (shape < 1)
        {
            var g = Gamma(shape + 1);
            return g * Math.Pow(NextDouble() + 1e-300, 1 / shape);
        }

        var d = shape - (1.0 / 3.0);
        var c = 1 / Math.Sqrt(9 * d);
        while (true)
        {
            double x;
            double v;
            do
            {
                x = Normal();
                v = 1 + (c * x);
            }
            while (v <= 0);

            v = v * v * v;
            var u = NextDouble();
            if (u < 1 - (0.0331 * x * x * x * x) || Math.Log(u) < (0.5 * x * x) + (d * (1 - v + Math.Log(v))))
            {
                return d * v;
            }
        }
    }

    /// <summary>A random permutation of 0…n−1 (Fisher–Yates).</summary>
    public int[] Permutation(int n)
    {
        var p = new int[n];
        for (var i = 0; i < n; i++)
        {
            p[i] = i;
        }

        for (var i = n - 1; i > 0; i--)
        {
            var j = NextInt(i + 1);
            (p[i], p[j]) = (p[j], p[i]);
        }

        return p;
    }

    private static ulong SplitMix(ref ulong x)
    {
        x += 0x9E3779B97F4A7C15UL;
        return Finalise(x);
    }

    private static ulong Finalise(ulong z)
    {
        z = (z ^ (z >> 30)) * 0xBF58476D1CE4E5B9UL;
        z = (z ^ (z >> 27)) * 0x94D049BB133111EBUL;
        return z ^ (z >> 31);
    }

    private static ulong RotateLeft(ulong x, int k) => (x << k) | (x >> (64 - k));
}
