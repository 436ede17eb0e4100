using System.Runtime.CompilerServices;
using System.Runtime.InteropServices;
using System.Runtime.Intrinsics;

namespace TaskPhrase.Resolution.Scoring;

/// <summary>
/// Vector kernels whose results are bit-identical on every CPU, so that fitted scorers are reproducible:
/// the dot product always accumulates in the same sixteen lanes (two 256-bit or four 128-bit registers, whichever
/// the CPU accelerates; lane j sums elements j, j + 16, j + 32, …) and reduces them in a fixed order; multiplies and
/// adds are never fused. Element-wise kernels are exact per element whatever the vector width.
/// </summary>
internal static class Kernels
{
    private const int Lanes = 16;

    /// <summary>Σ x[i]·y[i] in float, deterministic (see the type's remarks).</summary>
    public static float Dot(ReadOnlySpan<float> x, ReadOnlySpan<float> y)
    {
        if (x.Length != y.Length) throw new ArgumentException($"Vectors of {x.Length} and {y.Length} elements.", nameof(y));
        // The lanes, their order of reduction and the tail of Dot4, for one row (Dot4 with one row repeats the work
        // of four): the same float operations in the same order, so the same result bit for bit.
        int n = x.Length, i = 0;
        ref float rx = ref MemoryMarshal.GetReference(x);
        ref float ry = ref MemoryMarshal.GetReference(y);
        float sum = 0f;
        if (Vector256.IsHardwareAccelerated)
        {
            Vector256<float> a0 = default, a1 = default;
            for (; i + Lanes <= n; i += Lanes)
            {
                a0 += Vector256.Multiply(Vector256.LoadUnsafe(ref rx, (nuint)i), Vector256.LoadUnsafe(ref ry, (nuint)i));
                a1 += Vector256.Multiply(Vector256.LoadUnsafe(ref rx, (nuint)(i + 8)), Vector256.LoadUnsafe(ref ry, (nuint)(i + 8)));
            }
            return Finish(a0, a1, x, y, i);
        }
        else
        {
            Vector128<float> a0 = default, a1 = default, a2 = default, a3 = default;
            for (; i + Lanes <= n; i += Lanes)
            {
                a0 += Vector128.Multiply(Vector128.LoadUnsafe(ref rx, (nuint)i), Vector128.LoadUnsafe(ref ry, (nuint)i));
                a1 += Vector128.Multiply(Vector128.LoadUnsafe(ref rx, (nuint)(i + 4)), Vector128.LoadUnsafe(ref ry, (nuint)(i + 4)));
                a2 += Vector128.Multiply(Vector128.LoadUnsafe(ref rx, (nuint)(i + 8)), Vector128.LoadUnsafe(ref ry, (nuint)(i + 8)));
                a3 += Vector128.Multiply(Vector128.LoadUnsafe(ref rx, (nuint)(i + 12)), Vector128.LoadUnsafe(ref ry, (nuint)(i + 12)));
            }
            for (int j = 0; j < 4; j++) sum += a0.GetElement(j);
            for (int j = 0; j < 4; j++) sum += a1.GetElement(j);
            for (int j = 0; j < 4; j++) sum += a2.GetElement(j);
            for (int j = 0; j < 4; j++) sum += a3.GetElement(j);
        }
        for (; i < n; i++) sum += Unsafe.Add(ref rx, i) * Unsafe.Add(ref ry, i);
        return sum;
    }

    /// <summary>
    /// The dot products of the first <c>row.Length</c> elements of <paramref name="x"/> with each of four rows of
    /// different lengths that hold the same number of whole blocks of 16 (e.g. consecutive rows of a packed triangular
    /// matrix), into <paramref name="result"/>; each bit-identical to <see cref="Dot(ReadOnlySpan{float}, ReadOnlySpan{float})"/>
    /// of that prefix of x and the row. The blocks share their loads of x.
    /// </summary>
    public static void DotSameBlocks4(ReadOnlySpan<float> x, ReadOnlySpan<float> row0, ReadOnlySpan<float> row1, ReadOnlySpan<float> row2,
        ReadOnlySpan<float> row3, Span<float> result)
    {
        int blocks = row0.Length / Lanes;
        if (row1.Length / Lanes != blocks || row2.Length / Lanes != blocks || row3.Length / Lanes != blocks || result.Length < 4
            || Math.Max(Math.Max(row0.Length, row1.Length), Math.Max(row2.Length, row3.Length)) > x.Length)
            throw new ArgumentException("Need four rows with the same number of whole blocks of 16, none longer than x, and room for four results.");
        if (!Vector256.IsHardwareAccelerated)
        {
            result[0] = Dot(x[..row0.Length], row0);
            result[1] = Dot(x[..row1.Length], row1);
            result[2] = Dot(x[..row2.Length], row2);
            result[3] = Dot(x[..row3.Length], row3);
            return;
        }
        ref float rx = ref MemoryMarshal.GetReference(x);
        ref float r0 = ref MemoryMarshal.GetReference(row0);
        ref float r1 = ref MemoryMarshal.GetReference(row1);
        ref float r2 = ref MemoryMarshal.GetReference(row2);
        ref float r3 = ref MemoryMarshal.GetReference(row3);
        Vector256<float> a00 = default, a01 = default, a10 = default, a11 = default, a20 = default, a21 = default, a30 = default, a31 = default;
        int end = blocks * Lanes;
        for (int i = 0; i < end; i += Lanes)
        {
            var x0 = Vector256.LoadUnsafe(ref rx, (nuint)i);
            var x1 = Vector256.LoadUnsafe(ref rx, (nuint)(i + 8));
            a00 += Vector256.Multiply(x0, Vector256.LoadUnsafe(ref r0, (nuint)i));
            a01 += Vector256.Multiply(x1, Vector256.LoadUnsafe(ref r0, (nuint)(i + 8)));
            a10 += Vector256.Multiply(x0, Vector256.LoadUnsafe(ref r1, (nuint)i));
            a11 += Vector256.Multiply(x1, Vector256.LoadUnsafe(ref r1, (nuint)(i + 8)));
            a20 += Vector256.Multiply(x0, Vector256.LoadUnsafe(ref r2, (nuint)i));
            a21 += Vector256.Multiply(x1, Vector256.LoadUnsafe(ref r2, (nuint)(i + 8)));
            a30 += Vector256.Multiply(x0, Vector256.LoadUnsafe(ref r3, (nuint)i));
            a31 += Vector256.Multiply(x1, Vector256.LoadUnsafe(ref r3, (nuint)(i + 8)));
        }
        result[0] = Finish(a00, a01, x, row0, end);
        result[1] = Finish(a10, a11, x, row1, end);
        result[2] = Finish(a20, a21, x, row2, end);
        result[3] = Finish(a30, a31, x, row3, end);
    }

    /// <summary><see cref="Dot(ReadOnlySpan{float}, ReadOnlySpan{float})"/>'s reduction of its 16 lanes in order, then its tail from <paramref name="start"/>.</summary>
    private static float Finish(Vector256<float> low, Vector256<float> high, ReadOnlySpan<float> x, ReadOnlySpan<float> row, int start)
    {
        float sum = 0f;
        for (int j = 0; j < 8; j++) sum += low.GetElement(j);
        for (int j = 0; j < 8; j++) sum += high.GetElement(j);
        for (int k = start; k < row.Length; k++) sum += x[k] * row[k];
        return sum;
    }

    /// <summary>
    /// The dot products of <paramref name="x"/> with <paramref name="count"/> (1 to 4) rows of <paramref name="rows"/>
    /// starting at <paramref name="first"/> (rows as wide as x, packed), into <paramref name="result"/>; each bit-identical
    /// to <see cref="Dot(ReadOnlySpan{float}, ReadOnlySpan{float})"/> of x and that row. Sharing the loads of x across
    /// rows makes matrix–vector products faster.
    /// </summary>
    public static void Dot4(ReadOnlySpan<float> x, ReadOnlySpan<float> rows, int first, int count, Span<float> result)
    {
        int n = x.Length;
        if (count is < 1 or > 4 || rows.Length < (first + count) * n || result.Length < count)
            throw new ArgumentException($"Cannot take {count} rows of {n} from row {first} of {rows.Length} values into {result.Length} results.");
        ref float rx = ref MemoryMarshal.GetReference(x);
        ref float r0 = ref Unsafe.Add(ref MemoryMarshal.GetReference(rows), first * n);
        int i = 0;
        Span<float> lanes = stackalloc float[4 * Lanes];
        if (Vector256.IsHardwareAccelerated)
        {
            Vector256<float> a00 = default, a01 = default, a10 = default, a11 = default, a20 = default, a21 = default, a30 = default, a31 = default;
            ref float r1 = ref Unsafe.Add(ref r0, count > 1 ? n : 0);
            ref float r2 = ref Unsafe.Add(ref r0, count > 2 ? 2 * n : 0);
            ref float r3 = ref Unsafe.Add(ref r0, count > 3 ? 3 * n : 0);
            for (; i + Lanes <= n; i += Lanes)
            {
                var x0 = Vector256.LoadUnsafe(ref rx, (nuint)i);
                var x1 = Vector256.LoadUnsafe(ref rx, (nuint)(i + 8));
                a00 += Vector256.Multiply(x0, Vector256.LoadUnsafe(ref r0, (nuint)i));
                a01 += Vector256.Multiply(x1, Vector256.LoadUnsafe(ref r0, (nuint)(i + 8)));
                a10 += Vector256.Multiply(x0, Vector256.LoadUnsafe(ref r1, (nuint)i));
                a11 += Vector256.Multiply(x1, Vector256.LoadUnsafe(ref r1, (nuint)(i + 8)));
                a20 += Vector256.Multiply(x0, Vector256.LoadUnsafe(ref r2, (nuint)i));
                a21 += Vector256.Multiply(x1, Vector256.LoadUnsafe(ref r2, (nuint)(i + 8)));
                a30 += Vector256.Multiply(x0, Vector256.LoadUnsafe(ref r3, (nuint)i));
                a31 += Vector256.Multiply(x1, Vector256.LoadUnsafe(ref r3, (nuint)(i + 8)));
            }
            a00.CopyTo(lanes); a01.CopyTo(lanes[8..]);
            a10.CopyTo(lanes[16..]); a11.CopyTo(lanes[24..]);
            a20.CopyTo(lanes[32..]); a21.CopyTo(lanes[40..]);
            a30.CopyTo(lanes[48..]); a31.CopyTo(lanes[56..]);
        }
        else
        {
            for (int row = 0; row < count; row++)
            {
                ref float ry = ref Unsafe.Add(ref r0, row * n);
                Vector128<float> a0 = default, a1 = default, a2 = default, a3 = default;
                for (i = 0; i + Lanes <= n; i += Lanes)
                {
                    a0 += Vector128.Multiply(Vector128.LoadUnsafe(ref rx, (nuint)i), Vector128.LoadUnsafe(ref ry, (nuint)i));
                    a1 += Vector128.Multiply(Vector128.LoadUnsafe(ref rx, (nuint)(i + 4)), Vector128.LoadUnsafe(ref ry, (nuint)(i + 4)));
                    a2 += Vector128.Multiply(Vector128.LoadUnsafe(ref rx, (nuint)(i + 8)), Vector128.LoadUnsafe(ref ry, (nuint)(i + 8)));
                    a3 += Vector128.Multiply(Vector128.LoadUnsafe(ref rx, (nuint)(i + 12)), Vector128.LoadUnsafe(ref ry, (nuint)(i + 12)));
                }
                var l = lanes.Slice(row * Lanes, Lanes);
                a0.CopyTo(l); a1.CopyTo(l[4..]); a2.CopyTo(l[8..]); a3.CopyTo(l[12..]);
            }
        }
        for (int row = 0; row < count; row++)
        {
            float sum = 0f;
            var l = lanes.Slice(row * Lanes, Lanes);
            for (int j = 0; j < Lanes; j++) sum += l[j];
            ref float ry = ref Unsafe.Add(ref r0, row * n);
            for (int k = i; k < n; k++) sum += Unsafe.Add(ref rx, k) * Unsafe.Add(ref ry, k);
            result[row] = sum;
        }
    }

    /// <summary>y[i] += a·x[i] (multiply, then add; exact per element).</summary>
    public static void AddScaled(ReadOnlySpan<float> x, float a, Span<float> y)
    {
        if (x.Length != y.Length) throw new ArgumentException($"Vectors of {x.Length} and {y.Length} elements.", nameof(y));
        int n = x.Length, i = 0;
        ref float rx = ref MemoryMarshal.GetReference(x);
        ref float ry = ref MemoryMarshal.GetReference(y);
        if (Vector256.IsHardwareAccelerated)
        {
            var va = Vector256.Create(a);
            for (; i + 8 <= n; i += 8)
                (Vector256.LoadUnsafe(ref ry, (nuint)i) + Vector256.Multiply(va, Vector256.LoadUnsafe(ref rx, (nuint)i))).StoreUnsafe(ref ry, (nuint)i);
        }
        if (Vector128.IsHardwareAccelerated)
        {
            var va = Vector128.Create(a);
            for (; i + 4 <= n; i += 4)
                (Vector128.LoadUnsafe(ref ry, (nuint)i) + Vector128.Multiply(va, Vector128.LoadUnsafe(ref rx, (nuint)i))).StoreUnsafe(ref ry, (nuint)i);
        }
        for (; i < n; i++) Unsafe.Add(ref ry, i) += a * Unsafe.Add(ref rx, i);
    }

    /// <summary>y[i] += a·x[i] in double (multiply, then add; exact per element).</summary>
    public static void AddScaled(ReadOnlySpan<double> x, double a, Span<double> y)
    {
        if (x.Length != y.Length) throw new ArgumentException($"Vectors of {x.Length} and {y.Length} elements.", nameof(y));
        int n = x.Length, i = 0;
        ref double rx = ref MemoryMarshal.GetReference(x);
        ref double ry = ref MemoryMarshal.GetReference(y);
        if (Vector256.IsHardwareAccelerated)
        {
            var va = Vector256.Create(a);
            for (; i + 4 <= n; i += 4)
                (Vector256.LoadUnsafe(ref ry, (nuint)i) + Vector256.Multiply(va, Vector256.LoadUnsafe(ref rx, (nuint)i))).StoreUnsafe(ref ry, (nuint)i);
        }
        if (Vector128.IsHardwareAccelerated)
        {
            var va = Vector128.Create(a);
            for (; i + 2 <= n; i += 2)
                (Vector128.LoadUnsafe(ref ry, (nuint)i) + Vector128.Multiply(va, Vector128.LoadUnsafe(ref rx, (nuint)i))).StoreUnsafe(ref ry, (nuint)i);
        }
        for (; i < n; i++) Unsafe.Add(ref ry, i) += a * Unsafe.Add(ref rx, i);
    }

    /// <summary>Σ x[i]·y[i] in double, strictly in index order.</summary>
    public static double Dot(ReadOnlySpan<double> x, ReadOnlySpan<double> y)
    {
        if (x.Length != y.Length) throw new ArgumentException($"Vectors of {x.Length} and {y.Length} elements.", nameof(y));
        double sum = 0;
        for (int i = 0; i < x.Length; i++) sum += x[i] * y[i];
        return sum;
    }
}
