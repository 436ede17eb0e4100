namespace TaskPhrase.Registry;

/// <summary>Bounds for <see cref="RegistryLinter"/>. Immutable once built; values are checked when set.</summary>
public sealed class LintOptions
{
    /// <summary>The built-in negation words and word pairs.</summary>
    public static IReadOnlyList<string> DefaultNegationWords { get; } =
        ["don't", "dont", "do not", "never", "no longer", "not", "stop", "cannot"];

    // Declared after DefaultNegationWords: static initialisers run in text order.
    /// <summary>The defaults: collision 0.80, near-duplicate 0.95, confirm 0.70, at least 5 phrases, 2 to 20 words.</summary>
    public static LintOptions Default { get; } = new();

    /// <summary>Cosine at or above which a phrase collides with another task's phrase. Default 0.80.</summary>
    /// <exception cref="ArgumentOutOfRangeException">Outside [-1, 1].</exception>
    public float CollisionSimilarity { get => _collision; init => _collision = Cosine(value); }

    /// <summary>Cosine at or above which two phrases of one task count as redundant wording. Default 0.95.</summary>
    /// <exception cref="ArgumentOutOfRangeException">Outside [-1, 1].</exception>
    public float NearDuplicateSimilarity { get => _nearDuplicate; init => _nearDuplicate = Cosine(value); }

    /// <summary>Cosine at or above which a confirm task's phrase is too close to a non-confirm task's phrase. Default 0.70.</summary>
    /// <exception cref="ArgumentOutOfRangeException">Outside [-1, 1].</exception>
    public float ConfirmSimilarity { get => _confirm; init => _confirm = Cosine(value); }

    /// <summary>Fewest phrases a task should have. Default 5.</summary>
    /// <exception cref="ArgumentOutOfRangeException">Less than 1.</exception>
    public int MinPhrases
    {
        get => _minPhrases;
        init { ArgumentOutOfRangeException.ThrowIfLessThan(value, 1); _minPhrases = value; }
    }

    /// <summary>Fewest words a phrase should have. Default 2 (one-word phrases are flagged).</summary>
    /// <exception cref="ArgumentOutOfRangeException">Less than 1.</exception>
    public int MinWords
    {
        get => _minWords;
        init { ArgumentOutOfRangeException.ThrowIfLessThan(value, 1); _minWords = value; }
    }

    /// <summary>Most words a phrase should have. Default 20.</summary>
    /// <exception cref="ArgumentOutOfRangeException">Less than 1.</exception>
    public int MaxWords
    {
        get => _maxWords;
        init { ArgumentOutOfRangeException.ThrowIfLessThan(value, 1); _maxWords = value; }
    }

    /// <summary>
    /// Negation words and word sequences (lower-case, space-separated) that approved phrases should not contain.
    /// Besides these, any word ending in <c>n't</c> (can't, won't, …) counts. Default <see cref="DefaultNegationWords"/>.
    /// </summary>
    /// <exception cref="ArgumentNullException">Set to null.</exception>
    public IReadOnlyList<string> NegationWords
    {
        get => _negationWords;
        init { ArgumentNullException.ThrowIfNull(value); _negationWords = value.ToArray(); }
    }

    private static float Cosine(float value)
    {
        if (!(value >= -1f && value <= 1f)) throw new ArgumentOutOfRangeException(nameof(value), value, "A cosine bound must lie in [-1, 1].");
        return value;
    }

    private readonly float _collision = 0.80f;
    private readonly float _nearDuplicate = 0.95f;
    private readonly float _confirm = 0.70f;
    private readonly int _minPhrases = 5;
    private readonly int _minWords = 2;
    private readonly int _maxWords = 20;
    private readonly IReadOnlyList<string> _negationWords = DefaultNegationWords;
}
