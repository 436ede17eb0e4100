using CsCheck;
using TaskPhrase.Resolution.Scoring;

namespace TaskPhrase.Tests.Resolution.Scoring;

public class CholeskyTests
{
    [Fact]
    public void Factor_WorkedExample_GivesPublishedFactor()
    {
        // Worked example of the Wikipedia article "Cholesky decomposition" (from memory; checked by hand, L Lᵀ = A):
        // [[4, 12, −16], [12, 37, −43], [−16, −43, 98]] = L Lᵀ with L = [[2, 0, 0], [6, 1, 0], [−8, 5, 3]].
        double[] a = [4, 12, -16, 12, 37, -43, -16, -43, 98];
        var l = Cholesky.Factor(a, 3);
        Assert.Equal([2, 0, 0, 6, 1, 0, -8, 5, 3], l.Select(v => Math.Round(v, 12)).ToArray());
    }

    [Fact]
    public void InvertLower_WorkedExample_GivesHandComputedInverse()
    {
        // Hand computed by forward substitution: L⁻¹ = [[1/2, 0, 0], [−3, 1, 0], [19/3, −5/3, 1/3]].
        double[] l = [2, 0, 0, 6, 1, 0, -8, 5, 3];
        var inv = Cholesky.InvertLower(l, 3);
        double[] expected = [0.5, 0, 0, -3, 1, 0, 19.0 / 3, -5.0 / 3, 1.0 / 3];
        for (int i = 0; i < 9; i++) Assert.Equal(expected[i], inv[i], 12);
    }

    [Fact]
    public void InvertLower_TwoByTwo_WhitensByHand()
    {
        // Σ = [[4, 2], [2, 2]] = L Lᵀ with L = [[2, 0], [1, 1]]; W = L⁻¹ = [[1/2, 0], [−1/2, 1]]; by hand W Σ Wᵀ = I.
        double[] sigma = [4, 2, 2, 2];
        var w = Cholesky.InvertLower(Cholesky.Factor(sigma, 2), 2);
        Assert.Equal([0.5, 0, -0.5, 1], w);
        AssertWhitens(sigma, w, 2, 1e-15);
    }

    [Fact]
    public void InvertLower_RandomSpdMatrices_WhitenToIdentity()
    {
        // Property W Σ Wᵀ = I for Σ = B Bᵀ + I/10 (positive definite by construction; common practice).
        Gen.Int[1, 40].SelectMany(n => Gen.Double[-1, 1].Array[n * n].Select(b => (n, b))).Sample(t =>
        {
            var (n, b) = t;
            var sigma = new double[n * n];
            for (int i = 0; i < n; i++)
                for (int j = 0; j < n; j++)
                {
                    double s = i == j ? 0.1 : 0;
                    for (int k = 0; k < n; k++) s += b[i * n + k] * b[j * n + k];
                    sigma[i * n + j] = s;
                }
            var w = Cholesky.InvertLower(Cholesky.Factor(sigma, n), n);
            AssertWhitens(sigma, w, n, 1e-7);
        }, iter: 200);
    }

    [Fact]
    public void Factor_IndefiniteMatrix_ThrowsNamingPivot()
    {
        var e = Assert.Throws<InvalidOperationException>(() => Cholesky.Factor([1, 2, 2, 1], 2));
        Assert.Contains("pivot 1", e.Message);
        Assert.Contains("shrinkage", e.Message);
    }

    [Fact]
    public void Whitening_CholeskyVersusSymmetricInverseRoot_SameCosines()
    {
        // Any two whitening matrices differ by a rotation, so cosines agree. The symmetric Σ^(-1/2) of a 2×2 matrix from
        // the closed form √M = (M + √det M · I) / √(tr M + 2 √det M) (a standard identity, from memory).
        double[] sigma = [3, 1, 1, 2];
        var w = Cholesky.InvertLower(Cholesky.Factor(sigma, 2), 2);
        double sd = Math.Sqrt(3 * 2 - 1), norm = Math.Sqrt(3 + 2 + 2 * sd);
        double[] root = [(3 + sd) / norm, 1 / norm, 1 / norm, (2 + sd) / norm];
        double det = root[0] * root[3] - root[1] * root[2];
        double[] z = [root[3] / det, -root[1] / det, -root[2] / det, root[0] / det];
        AssertWhitens(sigma, z, 2, 1e-12);
        double[] x = [0.3, -1.2], y = [2.0, 0.7];
        Assert.Equal(Cosine(Mul(z, x), Mul(z, y)), Cosine(Mul(w, x), Mul(w, y)), 12);
    }

    private static double[] Mul(double[] m, double[] v) => [m[0] * v[0] + m[1] * v[1], m[2] * v[0] + m[3] * v[1]];

    private static double Cosine(double[] a, double[] b)
        => (a[0] * b[0] + a[1] * b[1]) / Math.Sqrt((a[0] * a[0] + a[1] * a[1]) * (b[0] * b[0] + b[1] * b[1]));

    internal static void AssertWhitens(double[] sigma, double[] w, int n, double tolerance)
    {
        for (int i = 0; i < n; i++)
            for (int j = 0; j < n; j++)
            {
                double s = 0;
                for (int a = 0; a < n; a++)
                    for (int b = 0; b < n; b++) s += w[i * n + a] * sigma[a * n + b] * w[j * n + b];
                Assert.True(Math.Abs(s - (i == j ? 1 : 0)) <= tolerance, $"(W Σ Wᵀ)[{i},{j}] = {s}, n = {n}");
            }
    }
}
