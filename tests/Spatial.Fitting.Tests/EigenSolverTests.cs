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

    [Fact]
    public void Given_a_matrix_of_known_spectrum_When_its_leading_pairs_are_found_by_subspace_iteration_Then_they_match_the_construction()
    {
        // A = S·diag(λ)·S with S_jk = √(2/(n+1))·sin(jkπ/(n+1)), the type-I discrete sine transform, which is symmetric and
        // orthogonal (a standard result): so A has eigenvalues λ and eigenvectors the columns of S, by construction.
        const int n = 365;
        double[] leading = [1000, 400, 150, 60];
        var lambda = Enumerable.Range(0, n).Select(k => k < leading.Length ? leading[k] : 10 * Math.Pow(0.9, k)).ToArray();
        var s = new double[n, n];
        for (var j = 0; j < n; j++)
        {
            for (var k = 0; k < n; k++)
            {
                s[j, k] = Math.Sqrt(2.0 / (n + 1)) * Math.Sin((j + 1) * (k + 1) * Math.PI / (n + 1));
            }
        }

        var a = new double[n * n];
        for (var i = 0; i < n; i++)
        {
            for (var j = 0; j < n; j++)
            {
                var sum = 0.0;
                for (var k = 0; k < n; k++)
                {
                    sum += s[i, k] * lambda[k] * s[j, k];
                }

                a[(i * n) + j] = sum;
            }
        }

        // A cold start (the first 12 unit vectors) and 40 steps: the error of pair 4 shrinks by λ_13/λ_4 = 10·0.9¹²/60 per step.
        var start = Enumerable.Range(0, 12).Select(i => Enumerable.Range(0, n).Select(d => d == i ? 1.0 : 0.0).ToArray()).ToArray();

        var (values, vectors) = SymmetricEigen.Leading(a, n, start, 4, 40);

        for (var k = 0; k < 4; k++)
        {
            Tolerance.Relative(leading[k], values[k], 1e-12, $"λ_{k + 1}");
            var sign = Math.Sign(Enumerable.Range(0, n).Sum(j => s[j, k] * vectors[k][j]));
            for (var j = 0; j < n; j++)
            {
                Tolerance.Near(s[j, k], sign * vectors[k][j], VectorTolerance, $"v_{k + 1}[{j}]");
            }
        }
    }
}
