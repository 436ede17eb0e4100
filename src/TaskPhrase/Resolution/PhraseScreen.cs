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
        => Bounds(vector, phraseTask, lower, upper, default);

    /// <summary>
    /// <see cref="Bounds(ReadOnlySpan{float}, ReadOnlySpan{int}, Span{double}, Span{double})"/>, and each row's upper
    /// bound into <paramref name="rowUpper"/> (as long as the screen has rows; the exact score of row r is at most
    /// rowUpper[r]), so a task's exact best can skip rows that cannot reach it.
    /// </summary>
    public bool Bounds(ReadOnlySpan<float> vector, ReadOnlySpan<int> phraseTask, Span<double> lower, Span<double> upper, Span<double> rowUpper)
    {
        lower.Fill(double.NegativeInfinity);
        upper.Fill(double.NegativeInfinity);
        return Scan(vector, phraseTask, lower, upper, default, default, rowUpper);
    }

    /// <summary>
    /// Per row, the approximate score and its bound: the exact score of row r lies within
    /// <paramref name="approx"/>[r] ± <paramref name="bound"/>[r]. False (bounds unusable) when the query is not finite.
    /// </summary>
    public bool RowBounds(ReadOnlySpan<float> vector, Span<double> approx, Span<double> bound)
        => Scan(vector, default, default, default, approx, bound, default);

    /// <summary>Quantises the query, then per row either folds the bounds into the task maxima or writes them out.</summary>
    private bool Scan(ReadOnlySpan<float> vector, ReadOnlySpan<int> phraseTask, Span<double> lower, Span<double> upper, Span<double> rowApprox, Span<double> rowBound,
        Span<double> rowUpper)
    {
        int dims = Dimensions;
        Span<short> p = dims <= 2048 ? stackalloc short[dims] : new short[dims];
        Span<byte> shifted = dims <= 2048 ? stackalloc byte[dims] : new byte[dims];
        if (!QuantizeQuery(vector, p, shifted, out double b, out double vNorm, out double fNorm)) return false;
        bool vnni = AvxVnni.IsSupported && dims % 32 == 0;
        bool four = vnni || (Avx2.IsSupported && dims % 16 == 0);
        bool perRow = rowApprox.Length > 0;
        // In blocks small enough for the stack (and the first-level cache): the block's exact integer dot products,
        // then its rows' bounds in vectors, then (task maxima) a fold of the block into the running maxima.
        Span<int> dots = stackalloc int[BlockRows];
        Span<double> hi = perRow ? default : stackalloc double[BlockRows];
        Span<double> lo = perRow ? default : stackalloc double[BlockRows];
        var fold = new TaskFold(lower, upper);
        for (int start = 0; start < Rows; start += BlockRows)
        {
            int n = Math.Min(BlockRows, Rows - start), r = 0;
            if (four)
                for (; r + 4 <= n; r += 4) RowDots4(start + r, shifted, p, vnni).StoreUnsafe(ref dots[r]);
            for (; r < n; r++) dots[r] = RowDot(start + r, shifted, p, vnni);
            if (perRow)
            {
                RowIntervals(start, dots[..n], b, fNorm, vNorm, rowApprox.Slice(start, n), rowBound.Slice(start, n), default, default);
                continue;
            }
            RowIntervals(start, dots[..n], b, fNorm, vNorm, default, default, hi[..n], lo[..n]);
            fold.Add(phraseTask.Slice(start, n), hi[..n], lo[..n]);
            if (rowUpper.Length > 0) hi[..n].CopyTo(rowUpper.Slice(start, n));
        }
        fold.Flush();
        return true;
    }

    /// <summary>
    /// The query as v = b·p + f: p[i] = round(v[i] / b) clamped to −127..127 with b = max|v| / 127 (and the same
    /// shifted by 128 for the unsigned kernel), ‖v‖ and ‖f‖ in double. Four components per vector where the CPU has
    /// AVX. The bounds hold for any integers p with f computed from them, so the rounding need not match a scalar loop
    /// bit for bit; both of <see cref="Scan"/>'s outputs use this one result. False when the query is not finite.
    /// </summary>
    private static bool QuantizeQuery(ReadOnlySpan<float> vector, Span<short> p, Span<byte> shifted, out double b, out double vNorm, out double fNorm)
    {
        int dims = vector.Length, i = 0;
        ref float rv = ref MemoryMarshal.GetReference(vector);
        double vv = 0, max = 0;
        if (Avx.IsSupported)
        {
            var squares = Vector256<double>.Zero;
            var largest = Vector256<double>.Zero;
            for (; i + 4 <= dims; i += 4)
            {
                var x = Avx.ConvertToVector256Double(Vector128.LoadUnsafe(ref rv, (nuint)i));
                squares += x * x;
                largest = Vector256.Max(largest, Vector256.Abs(x));
            }
            vv = Vector256.Sum(squares);
            for (int k = 0; k < 4; k++) max = Math.Max(max, largest.GetElement(k));
        }
        for (; i < dims; i++)
        {
            double x = vector[i];
            vv += x * x;
            max = Math.Max(max, Math.Abs(x));
        }
        b = max / 127;
        vNorm = Math.Sqrt(vv);
        fNorm = 0;
        // Σ v² overflows to ∞ or becomes NaN exactly when a component is not finite (floats squared fit a double).
        if (!double.IsFinite(vv)) return false;
        if (b == 0)
        {
            p.Clear();
            shifted.Fill(128);
            return true;
        }
        double ff = 0;
        i = 0;
        if (Avx.IsSupported)
        {
            var step = Vector256.Create(b);
            var limit = Vector256.Create(127.0);
            var residual = Vector256<double>.Zero;
            for (; i + 4 <= dims; i += 4)
            {
                var x = Avx.ConvertToVector256Double(Vector128.LoadUnsafe(ref rv, (nuint)i));
                var level = Vector256.Min(Vector256.Max(Avx.RoundToNearestInteger(x / step), -limit), limit);
                var f = x - step * level;
                residual += f * f;
                var ints = Avx.ConvertToVector128Int32(level);
                var narrow = Vector128.Narrow(ints, ints);
                Unsafe.WriteUnaligned(ref Unsafe.As<short, byte>(ref p[i]), narrow.AsInt64().ToScalar());
                var bytes = Vector128.Narrow(narrow + Vector128.Create((short)128), narrow);
                Unsafe.WriteUnaligned(ref shifted[i], bytes.AsInt32().ToScalar());
            }
            ff = Vector256.Sum(residual);
        }
        for (; i < dims; i++)
        {
            double level = Math.Clamp(Math.Round(vector[i] / b), -127, 127);
            p[i] = (short)level;
            shifted[i] = (byte)(level + 128);
            double f = vector[i] - b * level;
            ff += f * f;
        }
        fNorm = Math.Sqrt(ff);
        return true;
    }

    /// <summary>Rows per block of <see cref="Scan"/>: 256 rows' integers and bounds take 5 KB of stack.</summary>
    private const int BlockRows = 256;

    /// <summary>
    /// The rows' intervals from their integer dot products: approx = a_r·b·dot and bound = a_r·‖q_r‖·‖f‖ + (‖e_r‖ +
    /// slack)·‖v‖ + 10⁻⁶, written either as approx and bound or as approx + bound and approx − bound. Four rows per
    /// vector where the CPU has AVX, one at a time otherwise: the same double operations in the same order either way,
    /// so both forms and both paths give the same doubles, bit for bit.
    /// </summary>
    private void RowIntervals(int start, ReadOnlySpan<int> dots, double b, double fNorm, double vNorm,
        Span<double> approxOut, Span<double> boundOut, Span<double> hiOut, Span<double> loOut)
    {
        int n = dots.Length, i = 0;
        bool split = approxOut.Length > 0;
        if (Avx.IsSupported)
        {
            var slack = Vector256.Create(1e-6);
            for (; i + 4 <= n; i += 4)
            {
                var dot = Avx.ConvertToVector256Double(Vector128.LoadUnsafe(ref MemoryMarshal.GetReference(dots), (nuint)i));
                var approx = Vector256.LoadUnsafe(ref _scale[start + i]) * b * dot;
                var bound = Vector256.LoadUnsafe(ref _quantNorm[start + i]) * fNorm + Vector256.LoadUnsafe(ref _vectorTerm[start + i]) * vNorm + slack;
                if (split)
                {
                    approx.StoreUnsafe(ref approxOut[i]);
                    bound.StoreUnsafe(ref boundOut[i]);
                }
                else
                {
                    (approx + bound).StoreUnsafe(ref hiOut[i]);
                    (approx - bound).StoreUnsafe(ref loOut[i]);
                }
            }
        }
        for (; i < n; i++)
        {
            int r = start + i;
            double approx = _scale[r] * b * dots[i];
            double bound = _quantNorm[r] * fNorm + _vectorTerm[r] * vNorm + 1e-6;
            if (split)
            {
                approxOut[i] = approx;
                boundOut[i] = bound;
            }
            else
            {
                hiOut[i] = approx + bound;
                loOut[i] = approx - bound;
            }
        }
    }

    /// <summary>
    /// Folds rows' bounds into per-task maxima, the running task's maxima kept in locals while its rows follow one
    /// another (rows of a task are contiguous in a resolver's matrix; any order stays correct, as every run is folded
    /// into the task's maxima, across blocks too).
    /// </summary>
    private ref struct TaskFold(Span<double> lower, Span<double> upper)
    {
        private readonly Span<double> _lower = lower, _upper = upper;
        private int _task = -1;
        private double _up = double.NegativeInfinity, _lo = double.NegativeInfinity;

        public void Add(scoped ReadOnlySpan<int> tasks, scoped ReadOnlySpan<double> hi, scoped ReadOnlySpan<double> lo)
        {
            int task = _task;
            double up = _up, low = _lo;
            for (int i = 0; i < tasks.Length; i++)
            {
                int t = tasks[i];
                if (t != task)
                {
                    if (task >= 0) Flush(task, up, low);
                    task = t;
                    up = hi[i];
                    low = lo[i];
                    continue;
                }
                // Branch-free maxima (finite values: the query was checked finite).
                up = Sse2.IsSupported ? Sse2.MaxScalar(Vector128.CreateScalarUnsafe(up), Vector128.CreateScalarUnsafe(hi[i])).ToScalar() : Math.Max(up, hi[i]);
                low = Sse2.IsSupported ? Sse2.MaxScalar(Vector128.CreateScalarUnsafe(low), Vector128.CreateScalarUnsafe(lo[i])).ToScalar() : Math.Max(low, lo[i]);
            }
            (_task, _up, _lo) = (task, up, low);
        }

        public readonly void Flush()
        {
            if (_task >= 0) Flush(_task, _up, _lo);
        }

        private readonly void Flush(int task, double up, double lo)
        {
            if (up > _upper[task]) _upper[task] = up;
            if (lo > _lower[task]) _lower[task] = lo;
        }
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
