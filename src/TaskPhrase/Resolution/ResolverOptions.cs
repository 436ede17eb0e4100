using TaskPhrase.Resolution.Scoring;

namespace TaskPhrase.Resolution;

/// <summary>Settings of a <see cref="TaskResolver"/>. Validated when set; copied at creation.</summary>
public sealed class ResolverOptions
{
    private int _topK = 3;
    private int _candidates = 5;
    private int _maxInputChars = 1000;
    private LearnedScoringOptions _learned = LearnedScoringOptions.Default;

    /// <summary>Scoring strategy; null uses the registry's <c>scoring</c> key, else <see cref="DefaultScoring"/>.</summary>
    public ScoringStrategy? Scoring { get; set; }

    /// <summary>The built-in default strategy, chosen from CLINC150 measurements (see README).</summary>
    public const ScoringStrategy DefaultScoring = ScoringStrategy.Centroid;

    /// <summary>k for <see cref="ScoringStrategy.TopK"/> (default 3).</summary>
    /// <exception cref="ArgumentOutOfRangeException">Below 1 or above 100.</exception>
    public int TopK
    {
        get => _topK;
        set { ArgumentOutOfRangeException.ThrowIfLessThan(value, 1); ArgumentOutOfRangeException.ThrowIfGreaterThan(value, 100); _topK = value; }
    }

    /// <summary>How many candidates a resolution lists (default 5).</summary>
    /// <exception cref="ArgumentOutOfRangeException">Below 1 or above 100.</exception>
    public int Candidates
    {
        get => _candidates;
        set { ArgumentOutOfRangeException.ThrowIfLessThan(value, 1); ArgumentOutOfRangeException.ThrowIfGreaterThan(value, 100); _candidates = value; }
    }

    /// <summary>
    /// Longest utterance, in characters after normalisation, that is processed (default 1,000); longer input
    /// is cut there and the resolution is flagged <see cref="Resolution.Truncated"/>.
    /// </summary>
    /// <exception cref="ArgumentOutOfRangeException">Below 16 or above 100,000.</exception>
    public int MaxInputChars
    {
        get => _maxInputChars;
        set { ArgumentOutOfRangeException.ThrowIfLessThan(value, 16); ArgumentOutOfRangeException.ThrowIfGreaterThan(value, 100_000); _maxInputChars = value; }
    }

    /// <summary>Override of the accept threshold for every task (ignores registry values); null keeps the registry's.</summary>
    public float? AcceptOverride { get; set; }

    /// <summary>Override of the margin for every task; null keeps the registry's.</summary>
    public float? MarginOverride { get; set; }

    /// <summary>Settings of the whitening and the learned head (<see cref="ScoringStrategy.Whitened"/>, <see cref="ScoringStrategy.Head"/>).</summary>
    /// <exception cref="ArgumentNullException">Set to null.</exception>
    public LearnedScoringOptions Learned
    {
        get => _learned;
        set => _learned = value ?? throw new ArgumentNullException(nameof(Learned));
    }

    /// <summary>Whether to run the lexical hazard check (default true).</summary>
    public bool HazardCheck { get; set; } = true;

    /// <summary>
    /// Whether to correct typing slips toward the registry's vocabulary before embedding (default true; only words the
    /// tokenizer does not know whole, one or two edits from exactly one registry word).
    /// </summary>
    public bool CorrectTypos { get; set; } = true;

    /// <summary>Whether to run the unintelligible guard (default true).</summary>
    public bool UnintelligibleGuard { get; set; } = true;

    /// <summary>
    /// Whether an utterance rejected as out of scope gets a second chance with its speech-recognition slips swapped for
    /// registry words that sound alike ("water the basel" → "water the basil") and courtesy words at its edges dropped
    /// ("ok …", "… thanks"; default true). The rewrite is kept
    /// only when it is accepted with a score of at least the task's accept threshold plus <see cref="SecondChanceLift"/>
    /// and every swapped-in word belongs to the accepted task; the swaps are reported in
    /// <see cref="Resolution.Corrections"/>. Costs one more forward pass, and only for such rejections.
    /// </summary>
    public bool SecondChance { get; set; } = true;

    /// <summary>How far above the accept threshold a sound-alike rewrite must score to be kept (default 0.10, 0 to 1).</summary>
    /// <exception cref="ArgumentOutOfRangeException">The value is outside [0, 1] or not a number.</exception>
    public float SecondChanceLift
    {
        get => _secondChanceLift;
        set
        {
            if (!(value >= 0 && value <= 1))
                throw new ArgumentOutOfRangeException(nameof(value), value, "SecondChanceLift must be between 0 and 1, e.g. 0.10.");
            _secondChanceLift = value;
        }
    }

    private float _secondChanceLift = 0.10f;

    /// <summary>Whether best-phrase scoring may use the 8-bit phrase screen (exact either way; off only to compare in tests).</summary>
    internal bool PhraseScreen { get; set; } = true;

    internal ResolverOptions Clone() => (ResolverOptions)MemberwiseClone();
}
