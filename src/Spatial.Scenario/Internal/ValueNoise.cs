namespace Spatial.Scenario.Internal;

/// <summary>
/// Smooth 2-D value noise on a hashed integer lattice with quintic fade, summed over octaves
/// (fractional Brownian motion, Musgrave's fBm with lacunarity 2 and gain 1/2). Values in about −1…1.
/// Deterministic for a seed.
/// </summary>
internal sealed class ValueNoise(ulong seed)
{
    /// <summary>fBm of <paramref name="octaves"/> octaves at (x, y) in lattice units of the first octave.</summary>
    public double Fbm(double x, double y, int octaves)
    {
        var sum = 0.0;
        var amp = 1.0;
        var norm = 0.0;
        for (var o = 0; o < octaves; o++)
        {
            sum += amp * Single(x, y, (ulong)o);
            norm += amp;
            amp *= 0.5;
            x *= 2.0;
            y *= 2.0;
        }

        return sum / norm;
    }

    private double Single(double x, double y, ulong octave)
    {
        var x0 = Math.Floor(x);
        var y0 = Math.Floor(y);
        var fx = Fade(x - x0);
        var fy = Fade(y - y0);
        var ix = (long)x0;
        var iy = (long)y0;
        var a = Lattice(ix, iy, octave);
        var b = Lattice(ix + 1, iy, octave);
        var c = Lattice(ix, iy + 1, octave);
        var d = Lattice(ix + 1, iy + 1, octave);
        var top = a + ((b - a) * fx);
        var bottom = c + ((d - c) * fx);
        return top + ((bottom - top) * fy);
    }

    private double Lattice(long ix, long iy, ulong octave)
    {
        // A SplitMix64-style finaliser over the seed, the lattice point and the octave (no allocation in this hot path).
        var h = seed ^ (unchecked((ulong)ix) * 0x9E3779B97F4A7C15UL) ^ (unchecked((ulong)iy) * 0xC2B2AE3D27D4EB4FUL) ^ ((octave + 1) * 0x165667B19E3779F9UL);
        h = (h ^ (h >> 30)) * 0xBF58476D1CE4E5B9UL;
        h = (h ^ (h >> 27)) * 0x94D049BB133111EBUL;
        h ^= h >> 31;
        return ((h >> 11) * (2.0 / (1UL << 53))) - 1.0;
    }

    private static double Fade(double t) => t * t * t * ((t * ((t * 6) - 15)) + 10);
}
