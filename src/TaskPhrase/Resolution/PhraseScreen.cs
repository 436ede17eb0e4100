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
    private readonly int[] _qSum;
    private readonly double[] _scale;
    private readonly double[] _quantNorm;
    private readonly double[] _vectorTerm;

    private PhraseScreen(int rows, int dims, sbyte[] q, int[] qSum, double[] scale, double[] quantNorm, double[] residualNorm, double[] rowNorm)
    {
        Rows = rows;
        Dimensions = dims;
        _q = q;
        _qSum = qSum;
        _scale = scale;
        _quantNorm = quantNorm;
        // The bound's terms that multiply ‖v‖: the row's residual and the float-rounding slack (see the remarks).
        _vectorTerm = new double[rows];
        for (int r = 0; r < rows; r++) _vectorTerm[r] = residualNorm[r] + 1e-4 * rowNorm[r];
    }

    public int Rows { get; }

    public int Dimensions { get; }

    /// <summary>Quantises <paramref name="phrases"/> (row-major, <paramref name="dims"/> wide).</summary>
    public static PhraseScreen Build(ReadOnlySpan<float> phrases, int dims)
    {
        int rows = dims == 0 ? 0 : phrases.Length / dims;
        var q = new sbyte[rows * dims];
        var qSum = new int[rows];
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
            foreach (sbyte qi in q.AsSpan(r * dims, dims)) qSum[r] += qi;
            scale[r] = a;
            quantNorm[r] = a * Math.Sqrt(qq);
            residualNorm[r] = Math.Sqrt(ee);
            rowNorm[r] = Math.Sqrt(xx);
        }
        return new PhraseScreen(rows, dims, q, qSum, scale, quantNorm, residualNorm, rowNorm);
    }

    /// <summary>
    /// Per task, bounds on its best phrase score: <paramref name="lower"/>[t] ≤ max over its rows of the exact score ≤
    /// <paramref name="upper"/>[t]. False (bounds unusable) when the query is not finite.
    /// </summary>
    public bool Bounds(ReadOnlySpan<float> vector, ReadOnlySpan<int> phraseTask, Span<double> lower, Span<double> upper)
    {
        lower.Fill(double.NegativeInfinity);
        upper.Fill(double.NegativeInfinity);
        return Scan(vector, phraseTask, lower, upper, default, default);
    }

    /// <summary>
    /// Per row, the approximate score and its bound: the exact score of row r lies within
    /// <paramref name="approx"/>[r] ± <paramref name="bound"/>[r]. False (bounds unusable) when the query is not finite.
    /// </summary>
    public bool RowBounds(ReadOnlySpan<float> vector, Span<double> approx, Span<double> bound)
        => Scan(vector, default, default, default, approx, bound);

    /// <summary>Quantises the query, then per row either folds the bounds into the task maxima or writes them out.</summary>
    private bool Scan(ReadOnlySpan<float> vector, ReadOnlySpan<int> phraseTask, Span<double> lower, Span<double> upper, Span<double> rowApprox, Span<double> rowBound)
    {
        int dims = Dimensions;
        Span<short> p = dims <= 2048 ? stackalloc short[dims] : new short[dims];
        Span<byte> shifted = dims <= 2048 ? stackalloc byte[dims] : new byte[dims];
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
            shifted[i] = (byte)(pi + 128);
            double f = vector[i] - b * pi;
            ff += f * f;
        }
        double vNorm = Math.Sqrt(vv), fNorm = Math.Sqrt(ff);
        bool vnni = AvxVnni.IsSupported && dims % 32 == 0, perRow = rowApprox.Length > 0;
        bool four = vnni || (Avx2.IsSupported && dims % 16 == 0);
        if (!perRow && four)
        {
            FoldFourRows(shifted, p, vnni, b, fNorm, vNorm, phraseTask, lower, upper);
            return true;
        }
        int blocked = four ? Rows - Rows % 4 : 0;
        Vector128<int> dots = default;
        for (int r = 0; r < Rows; r++)
        {
            if (r < blocked && r % 4 == 0) dots = RowDots4(r, shifted, p, vnni);
            int dot = r < blocked ? dots.GetElement(r % 4) : RowDot(r, shifted, p, vnni);
            double approx = _scale[r] * b * dot;
            double bound = _quantNorm[r] * fNorm + _vectorTerm[r] * vNorm + 1e-6;
            if (perRow)
            {
                rowApprox[r] = approx;
                rowBound[r] = bound;
                continue;
            }
            int t = phraseTask[r];
            if (approx + bound > upper[t]) upper[t] = approx + bound;
            if (approx - bound > lower[t]) lower[t] = approx - bound;
        }
        return true;
    }

    /// <summary>
    /// Σ u[i]·q[i] for unsigned u and signed q (VPDPBUSD: four u8×s8 products summed into each 32-bit lane, no
    /// saturation), exact for |q| ≤ 127 and u ≤ 255 below 16,000 dimensions. Needs <see cref="AvxVnni"/> and a length
    /// that is a multiple of 32.
    /// </summary>
    internal static int DotShiftedVnni(ReadOnlySpan<byte> u, ReadOnlySpan<sbyte> q)
    {
        ref byte ru = ref MemoryMarshal.GetReference(u);
        ref sbyte rq = ref MemoryMarshal.GetReference(q);
        var acc0 = Vector256<int>.Zero;
        var acc1 = Vector256<int>.Zero;
        int n = q.Length, i = 0;
        for (; i + 64 <= n; i += 64)
        {
            acc0 = AvxVnni.MultiplyWideningAndAdd(acc0, Vector256.LoadUnsafe(ref ru, (nuint)i), Vector256.LoadUnsafe(ref rq, (nuint)i));
            acc1 = AvxVnni.MultiplyWideningAndAdd(acc1, Vector256.LoadUnsafe(ref ru, (nuint)(i + 32)), Vector256.LoadUnsafe(ref rq, (nuint)(i + 32)));
        }
        for (; i + 32 <= n; i += 32)
            acc0 = AvxVnni.MultiplyWideningAndAdd(acc0, Vector256.LoadUnsafe(ref ru, (nuint)i), Vector256.LoadUnsafe(ref rq, (nuint)i));
        return Vector256.Sum(acc0 + acc1);
    }

    /// <summary>
    /// The task-maxima fold of <see cref="Scan"/>, four rows at a time: the same integers and the same double
    /// arithmetic in the same order (so the same bounds, bit for bit), the four rows' bounds computed in one vector, and
    /// each task's running maxima kept in registers while its rows follow one another (rows of a task are contiguous in a
    /// resolver's matrix; any order stays correct, as every run is folded into the task's maxima). The four dot products
    /// come from <see cref="DotShiftedVnni4"/> where the CPU has AVX-VNNI (<paramref name="vnni"/>), else from
    /// <see cref="DotInt8x4"/> (AVX-512BW or AVX2 16-bit multiply-adds: CPUs with AVX-512 VNNI but not the VEX form, such
    /// as AMD Zen 4, take this path).
    /// </summary>
    private void FoldFourRows(ReadOnlySpan<byte> shifted, ReadOnlySpan<short> p, bool vnni, double b, double fNorm, double vNorm,
        ReadOnlySpan<int> phraseTask, Span<double> lower, Span<double> upper)
    {
        int dims = Dimensions, rows = Rows, task = -1, r = 0;
        double up = double.NegativeInfinity, lo = double.NegativeInfinity;
        void Add(int t, double hi, double low, Span<double> lowerSpan, Span<double> upperSpan)
        {
            if (t != task)
            {
                if (task >= 0) Flush(task, up, lo, lowerSpan, upperSpan);
                task = t;
                up = hi;
                lo = low;
                return;
            }
            if (hi > up) up = hi;
            if (low > lo) lo = low;
        }
        if (Avx2.IsSupported)
        {
            var slack = Vector256.Create(1e-6);
            for (; r + 4 <= rows; r += 4)
            {
                var dot = Avx.ConvertToVector256Double(RowDots4(r, shifted, p, vnni));
                var approx = Vector256.LoadUnsafe(ref _scale[r]) * b * dot;
                var bound = Vector256.LoadUnsafe(ref _quantNorm[r]) * fNorm + Vector256.LoadUnsafe(ref _vectorTerm[r]) * vNorm + slack;
                var hi = approx + bound;
                var low = approx - bound;
                int first = phraseTask[r];
                if (first == task && phraseTask[r + 3] == task && phraseTask[r + 1] == task && phraseTask[r + 2] == task)
                {
                    // All four rows continue the current task's run (the usual case: a task's rows are contiguous):
                    // fold them with two vector maxima instead of four scalar steps.
                    var hi2 = Vector128.Max(hi.GetLower(), hi.GetUpper());
                    var low2 = Vector128.Max(low.GetLower(), low.GetUpper());
                    double hiMax = Math.Max(hi2.GetElement(0), hi2.GetElement(1)), lowMax = Math.Max(low2.GetElement(0), low2.GetElement(1));
                    if (hiMax > up) up = hiMax;
                    if (lowMax > lo) lo = lowMax;
                    continue;
                }
                for (int k = 0; k < 4; k++) Add(phraseTask[r + k], hi.GetElement(k), low.GetElement(k), lower, upper);
            }
        }
        for (; r < rows; r++)
        {
            int dot = RowDot(r, shifted, p, vnni);
            double approx = _scale[r] * b * dot;
            double bound = _quantNorm[r] * fNorm + _vectorTerm[r] * vNorm + 1e-6;
            Add(phraseTask[r], approx + bound, approx - bound, lower, upper);
        }
        if (task >= 0) Flush(task, up, lo, lower, upper);
    }

    /// <summary>
    /// Σ p·q of row <paramref name="r"/>, exact: on the VNNI path from the shifted query, Σ (p+128)·q − 128·Σq = Σ p·q,
    /// else from the 16-bit query (<see cref="DotInt8"/>).
    /// </summary>
    private int RowDot(int r, ReadOnlySpan<byte> shifted, ReadOnlySpan<short> p, bool vnni)
    {
        var row = _q.AsSpan(r * Dimensions, Dimensions);
        return vnni ? DotShiftedVnni(shifted, row) - 128 * _qSum[r] : DotInt8(row, p);
    }

    /// <summary><see cref="RowDot"/> for rows <paramref name="r"/> to r + 3 in one pass (<see cref="DotShiftedVnni4"/> or <see cref="DotInt8x4"/>).</summary>
    private Vector128<int> RowDots4(int r, ReadOnlySpan<byte> shifted, ReadOnlySpan<short> p, bool vnni)
    {
        var rows = _q.AsSpan(r * Dimensions, 4 * Dimensions);
        return vnni ? DotShiftedVnni4(shifted, rows) - Vector128.Create(128) * Vector128.LoadUnsafe(ref _qSum[r]) : DotInt8x4(rows, p);
    }

    private static void Flush(int task, double up, double lo, Span<double> lower, Span<double> upper)
    {
        if (up > upper[task]) upper[task] = up;
        if (lo > lower[task]) lower[task] = lo;
    }

    /// <summary>
    /// <see cref="DotShiftedVnni"/> for four consecutive rows of <paramref name="rows"/> (each as long as
    /// <paramref name="u"/>) as one vector: the query loaded once per chunk, four independent accumulators, and the four
    /// horizontal sums done together (pairwise adds within each 128-bit half, then the halves).
    /// </summary>
    internal static Vector128<int> DotShiftedVnni4(ReadOnlySpan<byte> u, ReadOnlySpan<sbyte> rows)
    {
        int n = u.Length;
        if (rows.Length < 4 * n) throw new ArgumentException("Need four rows as long as the query.", nameof(rows));
        ref byte ru = ref MemoryMarshal.GetReference(u);
        ref sbyte r0 = ref MemoryMarshal.GetReference(rows);
        ref sbyte r1 = ref Unsafe.Add(ref r0, n);
        ref sbyte r2 = ref Unsafe.Add(ref r0, 2 * n);
        ref sbyte r3 = ref Unsafe.Add(ref r0, 3 * n);
        Vector256<int> a0 = default, a1 = default, a2 = default, a3 = default;
        for (int i = 0; i + 32 <= n; i += 32)
        {
            var x = Vector256.LoadUnsafe(ref ru, (nuint)i);
            a0 = AvxVnni.MultiplyWideningAndAdd(a0, x, Vector256.LoadUnsafe(ref r0, (nuint)i));
            a1 = AvxVnni.MultiplyWideningAndAdd(a1, x, Vector256.LoadUnsafe(ref r1, (nuint)i));
            a2 = AvxVnni.MultiplyWideningAndAdd(a2, x, Vector256.LoadUnsafe(ref r2, (nuint)i));
            a3 = AvxVnni.MultiplyWideningAndAdd(a3, x, Vector256.LoadUnsafe(ref r3, (nuint)i));
        }
        var h = Avx2.HorizontalAdd(Avx2.HorizontalAdd(a0, a1), Avx2.HorizontalAdd(a2, a3));
        return h.GetLower() + h.GetUpper();
    }

    /// <summary>
    /// <see cref="DotInt8"/> for four consecutive rows of <paramref name="rows"/> (each as long as <paramref name="p"/>, a
    /// multiple of 16) as one vector, exact in 32-bit integers: each chunk of the query loaded once for the four rows,
    /// the rows widened to 16 bits and multiplied-and-added in pairs (VPMADDWD; 32 lanes with AVX-512BW, else 16 with
    /// AVX2). Needs <see cref="Avx2"/>.
    /// </summary>
    internal static Vector128<int> DotInt8x4(ReadOnlySpan<sbyte> rows, ReadOnlySpan<short> p)
    {
        int n = p.Length, i = 0;
        if (rows.Length < 4 * n || n % 16 != 0) throw new ArgumentException("Need four rows as long as the query, a multiple of 16.", nameof(rows));
        ref short rp = ref MemoryMarshal.GetReference(p);
        ref sbyte r0 = ref MemoryMarshal.GetReference(rows);
        ref sbyte r1 = ref Unsafe.Add(ref r0, n);
        ref sbyte r2 = ref Unsafe.Add(ref r0, 2 * n);
        ref sbyte r3 = ref Unsafe.Add(ref r0, 3 * n);
        Vector256<int> a0 = default, a1 = default, a2 = default, a3 = default;
        if (Avx512BW.IsSupported)
        {
            Vector512<int> w0 = default, w1 = default, w2 = default, w3 = default;
            for (; i + 32 <= n; i += 32)
            {
                var x = Vector512.LoadUnsafe(ref rp, (nuint)i);
                w0 += Avx512BW.MultiplyAddAdjacent(Avx512BW.ConvertToVector512Int16(Vector256.LoadUnsafe(ref r0, (nuint)i)), x);
                w1 += Avx512BW.MultiplyAddAdjacent(Avx512BW.ConvertToVector512Int16(Vector256.LoadUnsafe(ref r1, (nuint)i)), x);
                w2 += Avx512BW.MultiplyAddAdjacent(Avx512BW.ConvertToVector512Int16(Vector256.LoadUnsafe(ref r2, (nuint)i)), x);
                w3 += Avx512BW.MultiplyAddAdjacent(Avx512BW.ConvertToVector512Int16(Vector256.LoadUnsafe(ref r3, (nuint)i)), x);
            }
            a0 = w0.GetLower() + w0.GetUpper();
            a1 = w1.GetLower() + w1.GetUpper();
            a2 = w2.GetLower() + w2.GetUpper();
            a3 = w3.GetLower() + w3.GetUpper();
        }
        for (; i + 16 <= n; i += 16)
        {
            var x = Vector256.LoadUnsafe(ref rp, (nuint)i);
            a0 += Avx2.MultiplyAddAdjacent(Avx2.ConvertToVector256Int16(Vector128.LoadUnsafe(ref r0, (nuint)i)), x);
            a1 += Avx2.MultiplyAddAdjacent(Avx2.ConvertToVector256Int16(Vector128.LoadUnsafe(ref r1, (nuint)i)), x);
            a2 += Avx2.MultiplyAddAdjacent(Avx2.ConvertToVector256Int16(Vector128.LoadUnsafe(ref r2, (nuint)i)), x);
            a3 += Avx2.MultiplyAddAdjacent(Avx2.ConvertToVector256Int16(Vector128.LoadUnsafe(ref r3, (nuint)i)), x);
        }
        var h = Avx2.HorizontalAdd(Avx2.HorizontalAdd(a0, a1), Avx2.HorizontalAdd(a2, a3));
        return h.GetLower() + h.GetUpper();
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
