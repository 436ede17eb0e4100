namespace TaskPhrase.Evaluation;

/// <summary>
/// The PCG32 generator (O'Neill 2014, "PCG: A Family of Simple Fast Space-Efficient Statistically Good
/// Algorithms for Random Number Generation"; XSH-RR output, 64-bit state, selectable stream), written
/// here so that generated probe suites are the same on every platform and .NET version.
/// Not thread-safe; not for cryptography.
/// </summary>
internal sealed class Pcg32
{
    private const ulong Multiplier = 6364136223846793005UL;
    private ulong _state;
    private readonly ulong _increment;

    /// <summary>Seeds like the reference <c>pcg32_srandom_r(initstate, initseq)</c>.</summary>
    public Pcg32(ulong initState, ulong initSequence)
    {
        _increment = (initSequence << 1) | 1UL;
        _state = 0;
        NextUInt();
        _state += initState;
        NextUInt();
    }

    /// <summary>The next 32 random bits (<c>pcg32_random_r</c>).</summary>
    public uint NextUInt()
    {
        ulong old = _state;
        _state = unchecked(old * Multiplier + _increment);
        uint xorShifted = (uint)(((old >> 18) ^ old) >> 27);
        int rotation = (int)(old >> 59);
        return (xorShifted >> rotation) | (xorShifted << (-rotation & 31));
    }

    /// <summary>A uniform integer in [0, bound) without modulo bias (<c>pcg32_boundedrand_r</c>).</summary>
    public int Next(int bound)
    {
        if (bound <= 0) throw new ArgumentOutOfRangeException(nameof(bound), bound, "The bound must be positive.");
        uint b = (uint)bound;
        uint threshold = unchecked(0u - b) % b;
        while (true)
        {
            uint r = NextUInt();
            if (r >= threshold) return (int)(r % b);
        }
    }

    /// <summary>A uniform integer in [min, max] (inclusive).</summary>
    public int Between(int min, int max) => min + Next(max - min + 1);

    /// <summary>True with probability <paramref name="p"/>.</summary>
    public bool Chance(double p) => NextUInt() < p * 4294967296.0;

    /// <summary>A uniformly chosen element.</summary>
    public T Pick<T>(IReadOnlyList<T> items) => items[Next(items.Count)];

    /// <summary>Stable 64-bit FNV-1a hash of a string, used to give each probe kind its own stream.</summary>
    public static ulong StreamOf(string name)
    {
        ulong h = 14695981039346656037UL;
        foreach (char ch in name)
        {
            h ^= ch;
            h = unchecked(h * 1099511628211UL);
        }
        return h;
    }
}
