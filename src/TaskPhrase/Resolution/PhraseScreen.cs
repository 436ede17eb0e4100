using System.Runtime.CompilerServices;
using System.Runtime.InteropServices;
using System.Runtime.Intrinsics;
using System.Runtime.Intrinsics.X86;

namespace TaskPhrase.Resolution;

/// <summary>
/// An 8-bit copy of the phrase matrix that bounds every phrase score of a query, so best-phrase scoring can compute
/// exact scores only for the tasks that can be among the best (see <see cref="TaskResolver"/>'s scoring). A quarter of
/// the float matrix's size, so a large registry's screen stays in cache. Immutable and thread-safe.
/// </summary>
/// <remarks>
/// Row r is stored as q_r (integers in −127..127) with scale a_r = max|x_r|/127, so x_r = a_r·q_r + e_r; the query v
/// is quantised per call alike, v = b·p + f. Then x_r·v = a_r·b·(q_r·p) + a_r·(q_r·f) + e_r·v, and by Cauchy–Schwarz
/// the last two terms are at most a_r·‖q_r‖·‖f‖ + ‖e_r‖·‖v‖ in size. The integer dot product is exact; the norms
/// are computed in double. A slack of 10⁻⁴·‖x_r‖·‖v‖ + 10⁻⁶ covers the float rounding of the exact score the resolver
/// computes (at most about d·2⁻²⁴·‖x_r‖·‖v‖, 2.3·10⁻⁵ for 384 dimensions; common practice) and of the bounds
/// themselves. So the exact float score of row r always lies within [approx − bound, approx + bound].
/// </remarks>
internal sealed class PhraseScreen
{
    /// <summary>Fewest phrase rows for which the screen is built; smaller registries are scanned directly.</summary>
    public const int MinRows = 512;

    private readonly sbyte[] _q;
    private readonly double[] _scale;
    private readonly double[] _quantNorm;
    private readonly double[] _residualNorm;
    private readonly double[] _rowNorm;

    private PhraseScreen(int rows, int dims, sbyte[] q, double[] scale, double[] quantNorm, double[] residualNorm, double[] rowNorm)
    {
        Rows = rows;
        Dimensions = dims;
        _q = q;
        _scale = scale;
        _quantNorm = quantNorm;
        _residualNorm = residualNorm;
        _rowNorm = rowNorm;
    }

    public int Rows { get; }

    public int Dimensions { get; }

    /// <summary>Quantises <paramref name="phrases"/> (row-major, <paramref name="dims"/> wide).</summary>
    public static PhraseScreen Build(ReadOnlySpan<float> phrases, int dims)
    {
        int rows = dims == 0 ? 0 : phrases.Length / dims;
        var q = new sbyte[rows * dims];
        var scale = new double[rows];
        var quantNorm = new double[rows];
        var residualNorm = new double[rows];
        var rowNorm = new double[rows];
        for (int r = 0; r < rows; r++)
        {
            var x = phrases.Slice(r * dims, dims);
            double a = Quantize(x, q.AsSpan(r * dims, dims));
            double qq = 0, ee = 0, xx = 0;
            for (int i = 0; i < dims; i++)
            {
                double qi = q[r * dims + i], e = x[i] - a * qi;
                qq += qi * qi;
                ee += e * e;
                xx += (double)x[i] * x[i];
            }
            scale[r] = a;
            quantNorm[r] = a * Math.Sqrt(qq);
            residualNorm[r] = Math.Sqrt(ee);
            rowNorm[r] = Math.Sqrt(xx);
        }
        return new PhraseScreen(rows, dims, q, scale, quantNorm, residualNorm, rowNorm);
    }

    /// <summary>
    /// Per task, bounds on its best phrase score: <paramref name="lower"/>[t] ≤ max over its rows of the exact score ≤
    /// <paramref name="upper"/>[t]. False (bounds unusable) when the query is not finite.
    /// </summary>
    public bool Bounds(ReadOnlySpan<float> vector, ReadOnlySpan<int> phraseTask, Span<double> lower, Span<double> upper)
    {
        int dims = Dimensions;
        Span<short> p = dims <= 2048 ? stackalloc short[dims] : new short[dims];
        double vv = 0, max = 0;
        foreach (float x in vector)
        {
            if (!float.IsFinite(x)) return false;
            vv += (double)x * x;
            max = Math.Max(max, Math.Abs(x));
        }
        double b = max / 127, ff = 0;
        for (int i = 0; i < dims; i++)
        {
            double pi = b > 0 ? Math.Clamp(Math.Round(vector[i] / b), -127, 127) : 0;
            p[i] = (short)pi;
            double f = vector[i] - b * pi;
            ff += f * f;
        }
        double vNorm = Math.Sqrt(vv), fNorm = Math.Sqrt(ff);
        lower.Fill(double.NegativeInfinity);
        upper.Fill(double.NegativeInfinity);
        for (int r = 0; r < Rows; r++)
        {
            double approx = _scale[r] * b * DotInt8(_q.AsSpan(r * dims, dims), p);
            double bound = _quantNorm[r] * fNorm + _residualNorm[r] * vNorm + 1e-4 * _rowNorm[r] * vNorm + 1e-6;
            int t = phraseTask[r];
            lower[t] = Math.Max(lower[t], approx - bound);
            upper[t] = Math.Max(upper[t], approx + bound);
        }
        return true;
    }

    /// <summary>Σ q[i]·p[i], exact in 32-bit integers (|q|, |p| ≤ 127: no overflow below 133,000 dimensions).</summary>
    internal static int DotInt8(ReadOnlySpan<sbyte> q, ReadOnlySpan<short> p)
    {
        int n = q.Length, i = 0, sum = 0;
        ref sbyte rq = ref MemoryMarshal.GetReference(q);
        ref short rp = ref MemoryMarshal.GetReference(p);
        if (Avx2.IsSupported && n >= 16)
        {
            var acc = Vector256<int>.Zero;
            for (; i + 16 <= n; i += 16)
            {
                var q16 = Avx2.ConvertToVector256Int16(Vector128.LoadUnsafe(ref rq, (nuint)i));
                var p16 = Vector256.LoadUnsafe(ref rp, (nuint)i);
                acc = Avx2.Add(acc, Avx2.MultiplyAddAdjacent(q16, p16));
            }
            sum = Vector256.Sum(acc);
        }
        for (; i < n; i++) sum += Unsafe.Add(ref rq, i) * Unsafe.Add(ref rp, i);
        return sum;
    }

    /// <summary>Rounds x / a to integers in −127..127 with a = max|x| / 127; returns a (0 for a zero row).</summary>
    private static double Quantize(ReadOnlySpan<float> x, Span<sbyte> q)
    {
        double max = 0;
        foreach (float v in x) max = Math.Max(max, Math.Abs((double)v));
        double a = max / 127;
        for (int i = 0; i < x.Length; i++) q[i] = a > 0 ? (sbyte)Math.Clamp(Math.Round(x[i] / a), -127, 127) : (sbyte)0;
        return a;
    }
}
