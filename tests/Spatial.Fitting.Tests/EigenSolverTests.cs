using Spatial.Fitting.Internal;
using Spatial.Testing;
using Xunit;

namespace Spatial.Fitting.Tests;

public sealed class EigenSolverTests
{
    private const double EigenvalueTolerance = 1e-12;
    private const double VectorTolerance = 1e-10;

    [Theory]
    [InlineData(5)]
    [InlineData(40)]
    [InlineData(365)]
    public void Given_tridiagonal_Toeplitz_2_minus1_When_decomposed_Then_eigenvalues_are_2_minus_2cos_k_pi_over_n_plus_1(int n)
    {
        // Closed form for the tridiagonal Toeplitz matrix with diagonal 2 and off-diagonals −1:
        // λ_k = 2 − 2cos(kπ/(n+1)), v_k(j) ∝ sin(jkπ/(n+1)) (e.g. Smith 1985, "Numerical solution of PDEs", from memory; a standard result).
        var a = new double[n * n];
        for (var i = 0; i < n; i++)
        {
            a[(i * n) + i] = 2;
            if (i > 0)
            {
                a[(i * n) + i - 1] = -1;
                a[((i - 1) * n) + i] = -1;
            }
        }

        var (values, vectors) = SymmetricEigen.Decompose(a, n);
        for (var r = 0; r < n; r++)
        {
            var k = n - r; // descending order
            var expected = 2 - (2 * Math.Cos(k * Math.PI / (n + 1)));
            Tolerance.Near(expected, values[r], EigenvalueTolerance, $"λ_{k}");
        }

        // Eigenvector of the largest eigenvalue (k = n), compared up to sign.
        var v = vectors[0];
        var exact = Enumerable.Range(1, n).Select(j => Math.Sin(j * n * Math.PI / (n + 1))).ToArray();
        var norm = Math.Sqrt(exact.Sum(x => x * x));
        var sign = Math.Sign(exact.Zip(v).Sum(t => t.First * t.Second));
        for (var j = 0; j < n; j++)
        {
            Tolerance.Near(exact[j] / norm, sign * v[j], VectorTolerance, $"v_n[{j}]");
        }
    }
}
