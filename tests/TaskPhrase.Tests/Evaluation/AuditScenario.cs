using TaskPhrase.Evaluation;
using TaskPhrase.Registry;
using TaskPhrase.Resolution;
using ResolutionResult = TaskPhrase.Resolution.Resolution;

namespace TaskPhrase.Tests.Evaluation;

/// <summary>
/// A small, fully hand-checked audit of the Harbor Street registry: 12 probes with scripted resolutions (a
/// hand-written test double for the resolver). The expected metrics in the tests are counted by hand from this table.
/// </summary>
internal static class AuditScenario
{
    public const string RegistryHash = "3f1c9a0e5b7d2468ace13579bdf02468ace13579bdf02468ace13579bdf02468";
    public const string ModelId = "all-minilm-l6-v2";
    public const string ModelHash = "4a64cee3d4134bbdc86eed96e1a660efec58975417204ecfcf134140edb6e0e2";

    public static readonly string[] TaskIds =
    [
        "hall-light", "keys-hook", "mail-pickup", "water-basil", "page-turn", "phone-fetch",
        "pill-organizer", "kettle-pour", "window-latch", "remote-fetch", "blanket", "fish-food",
    ];

    public static AuditContext Context(int worstCases = 10) => new()
    {
        SuiteName = "harbor-street-audit.csv",
        SuitePath = "tests/data/probes/harbor-street-audit.csv",
        RegistryHash = RegistryHash,
        ModelId = ModelId,
        ModelHash = ModelHash,
        AcceptThreshold = 0.6,
        Margin = 0.04,
        TaskAcceptThresholds = new Dictionary<string, double> { ["kettle-pour"] = 0.7 },
        TaskIds = TaskIds,
        Date = new DateTimeOffset(2025, 6, 11, 9, 30, 0, TimeSpan.Zero),
        WorstCaseCount = worstCases,
        SweepSteps = 11,
    };

    // utterance, expect, kind, outcome, got/nearest task, score, reason
    private static readonly (string Utterance, string Expect, string Kind, ResolutionOutcome Outcome, string? Task, float? Score, RejectionReason Reason)[] Rows =
    [
        ("water the basil", "water-basil", "exact", ResolutionOutcome.Accepted, "water-basil", 1.0f, RejectionReason.None),
        ("give the basil a drink", "water-basil", "paraphrase", ResolutionOutcome.Accepted, "water-basil", 0.82f, RejectionReason.None),
        ("hang up my keys", "keys-hook", "paraphrase", ResolutionOutcome.Accepted, "keys-hook", 0.74f, RejectionReason.None),
        ("bring the phone over", "phone-fetch", "paraphrase", ResolutionOutcome.Accepted, "remote-fetch", 0.66f, RejectionReason.None),
        ("turn the paige", "page-turn", "asr-slip", ResolutionOutcome.Rejected, "page-turn", 0.55f, RejectionReason.OutOfScope),
        ("pass me the thing", "remote-fetch", "paraphrase", ResolutionOutcome.Ambiguous, "phone-fetch", 0.63f, RejectionReason.Ambiguous),
        ("fry me an egg", "reject", "out-of-scope", ResolutionOutcome.Rejected, "kettle-pour", 0.31f, RejectionReason.OutOfScope),
        ("don't water the basil", "reject", "negated", ResolutionOutcome.Rejected, "water-basil", 0.86f, RejectionReason.Negated),
        ("pour the kettle on my <script>alert(1)</script> hand", "reject", "look-alike", ResolutionOutcome.Accepted, "kettle-pour", 0.71f, RejectionReason.None),
        (" ", "reject", "empty", ResolutionOutcome.Rejected, null, null, RejectionReason.Empty),
        ("glorp vint shoo", "reject", "nonsense", ResolutionOutcome.Rejected, null, null, RejectionReason.Unintelligible),
        ("open the front door", "reject", "out-of-scope", ResolutionOutcome.Rejected, "window-latch", 0.58f, RejectionReason.OutOfScope),
    ];

    public static IReadOnlyList<ProbeCase> Probes { get; } =
        Rows.Select((r, i) => new ProbeCase(r.Utterance, r.Expect, r.Kind, null, i + 2)).ToArray();

    public static IReadOnlyList<ResolutionResult> Resolutions { get; } = Rows.Select(r => Resolve(r.Utterance, r.Outcome, r.Task, r.Score, r.Reason)).ToArray();

    /// <summary>
    /// A hand-made wrong-task trade-off curve for the report (caps 0, 5 %, 10 %, 20 %, 100 %; the strictest not reachable).
    /// </summary>
    public static IReadOnlyList<TradeOffPoint> TradeOff { get; } =
    [
        new(0.0, false, 0, 0, 0, null, null),
        new(0.05, true, 0.25, 0.05, 0.1, 0.8f, 0.05f),
        new(0.10, true, 0.40, 0.10, 0.1, 0.7f, 0.02f),
        new(0.20, true, 0.50, 0.1667, 0.2, 0.6f, 0.01f),
        new(1.0, true, 0.50, 0.1667, 0.2, 0.6f, 0.01f),
    ];

    public static AuditReport Report(int worstCases = 10) => AuditEvaluator.Evaluate(Probes, Resolutions, Context(worstCases));

    public static ResolutionResult Resolve(string utterance, ResolutionOutcome outcome, string? task, float? score, RejectionReason reason,
        string registryHash = RegistryHash, string modelId = ModelId) => new()
    {
        Utterance = utterance,
        Normalized = TaskPhrase.Text.TextNormalizer.Normalize(utterance),
        Outcome = outcome,
        Reason = reason,
        Task = task is null ? null : Task(task),
        Phrase = task,
        Score = score,
        ExactMatch = score == 1.0f,
        Candidates = task is null || score is null ? [] : [new TaskCandidate(task, task, score.Value)],
        RegistryHash = registryHash,
        ModelId = modelId,
    };

    private static TaskDefinition Task(string id) => new()
    {
        Id = id,
        Title = id,
        Controller = new ControllerBinding("test.v1", 1),
        Phrases = [id.Replace('-', ' ')],
    };
}
