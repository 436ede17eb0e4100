namespace TaskPhrase.Resolution.Scoring;

/// <summary>
/// Cholesky factorisation Σ = L Lᵀ of a symmetric positive-definite matrix and the inverse of its lower-triangular
/// factor. W = L⁻¹ is a whitening matrix: W Σ Wᵀ = I. Every other whitening matrix is Q W for an orthogonal Q, and
/// cosines and L2 norms are invariant under Q, so cosine scoring and an L2-regularised linear head give the same
/// results with W as with the symmetric Σ^(-1/2). Plain double arithmetic in a fixed order (deterministic).
/// </summary>
internal static class Cholesky
{
    /// <summary>
    /// Factorises the n×n row-major symmetric matrix <paramref name="a"/> (only its lower triangle is read) and
    /// returns L, row-major, zero above the diagonal.
    /// </summary>
    /// <exception cref="InvalidOperationException">The matrix is not positive definite (a pivot is not positive).</exception>
    public static double[] Factor(ReadOnlySpan<double> a, int n)
    {
        if (a.Length != n * n) throw new ArgumentException($"Expected {n}×{n} = {n * n} values, got {a.Length}.", nameof(a));
        var l = new double[n * n];
        for (int j = 0; j < n; j++)
        {
            var lj = l.AsSpan(j * n, j);
            double d = a[j * n + j] - Kernels.Dot(lj, lj);
            if (!(d > 0))
                throw new InvalidOperationException($"The matrix is not positive definite: pivot {j} is {d:G4}. Use more shrinkage toward the identity.");
            double ljj = Math.Sqrt(d);
            l[j * n + j] = ljj;
            for (int i = j + 1; i < n; i++)
            {
                double s = a[i * n + j] - Kernels.Dot(l.AsSpan(i * n, j), lj);
                l[i * n + j] = s / ljj;
            }
        }
        return l;
    }

    /// <summary>Inverse of the n×n row-major lower-triangular matrix <paramref name="l"/> (lower-triangular too).</summary>
    public static double[] InvertLower(ReadOnlySpan<double> l, int n)
    {
        if (l.Length != n * n) throw new ArgumentException($"Expected {n}×{n} = {n * n} values, got {l.Length}.", nameof(l));
        var inv = new double[n * n];
        for (int i = 0; i < n; i++)
        {
            double lii = l[i * n + i];
            if (lii == 0) throw new InvalidOperationException($"The triangular matrix is singular: diagonal {i} is zero.");
            inv[i * n + i] = 1.0 / lii;
            // Row i of L⁻¹: (L⁻¹)[i,j] = −(Σ_{k=j}^{i−1} L[i,k] (L⁻¹)[k,j]) / L[i,i] for j < i.
            for (int j = 0; j < i; j++)
            {
                double s = 0;
                for (int k = j; k < i; k++) s += l[i * n + k] * inv[k * n + j];
                inv[i * n + j] = -s / lii;
            }
        }
        return inv;
    }
}
