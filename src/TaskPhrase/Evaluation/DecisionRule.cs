using System.Collections.ObjectModel;
using TaskPhrase.Registry;
using TaskPhrase.Resolution;

namespace TaskPhrase.Evaluation;

/// <summary>
/// The threshold part of the decision procedure, in one place: given an accept threshold, a margin and
/// optional per-task overrides, it maps a <see cref="ScoredProbe"/> to accepted-as-task, rejected or
/// ambiguous. Everything in tuning (search, metrics, tests) is measured against <see cref="Apply"/>.
/// </summary>
/// <remarks>
/// <para>Order (decision procedure steps 3, 4/8/9/9b, 6, 7, 10): an exact match is accepted; a probe a
/// threshold-independent guard rejected stays rejected; a best score below the task's accept threshold
/// is rejected; a best score within the task's margin of the runner-up is ambiguous; otherwise the best
/// task is accepted.</para>
/// <para>The resolver checks the margin (step 7) before the look-alike and negation guards (steps 8 and 9),
/// so a guarded probe with a small margin comes out ambiguous there and rejected here. Both count as
/// "not accepted" in every audit metric, so the metrics agree.</para>
/// <para>Comparisons are written so that a NaN score is rejected and a NaN margin is ambiguous.
/// Immutable and thread-safe.</para>
/// </remarks>
public sealed class DecisionRule
{
    private static readonly IReadOnlyDictionary<string, float> NoOverrides =
        new ReadOnlyDictionary<string, float>(new Dictionary<string, float>());

    /// <summary>Creates a rule.</summary>
    /// <param name="accept">Registry-wide accept threshold (any finite value; above 1 rejects everything but exact matches).</param>
    /// <param name="margin">Registry-wide margin; finite and not negative.</param>
    /// <param name="acceptOverrides">Per-task accept thresholds by task id, or null for none.</param>
    /// <param name="marginOverrides">Per-task margins by task id, or null for none.</param>
    /// <exception cref="ArgumentOutOfRangeException">A threshold is not finite, or a margin is negative.</exception>
    public DecisionRule(float accept, float margin,
        IReadOnlyDictionary<string, float>? acceptOverrides = null,
        IReadOnlyDictionary<string, float>? marginOverrides = null)
    {
        CheckAccept(accept, nameof(accept), null);
        CheckMargin(margin, nameof(margin), null);
        Accept = accept;
        Margin = margin;
        AcceptOverrides = Copy(acceptOverrides, nameof(acceptOverrides), CheckAccept);
        MarginOverrides = Copy(marginOverrides, nameof(marginOverrides), CheckMargin);
    }

    /// <summary>The registry-wide accept threshold.</summary>
    public float Accept { get; }

    /// <summary>The registry-wide margin.</summary>
    public float Margin { get; }

    /// <summary>Per-task accept thresholds by task id (ordinal ids); empty when none.</summary>
    public IReadOnlyDictionary<string, float> AcceptOverrides { get; }

    /// <summary>Per-task margins by task id (ordinal ids); empty when none.</summary>
    public IReadOnlyDictionary<string, float> MarginOverrides { get; }

    /// <summary>The rule a registry's own thresholds define (its defaults and per-task <c>accept</c>/<c>margin</c>).</summary>
    /// <exception cref="ArgumentNullException"><paramref name="registry"/> is null.</exception>
    public static DecisionRule FromRegistry(TaskRegistry registry)
    {
        ArgumentNullException.ThrowIfNull(registry);
        var accepts = new Dictionary<string, float>(StringComparer.Ordinal);
        var margins = new Dictionary<string, float>(StringComparer.Ordinal);
        foreach (var task in registry.Tasks)
        {
            if (task.Accept is { } a) accepts[task.Id] = a;
            if (task.Margin is { } m) margins[task.Id] = m;
        }
        return new DecisionRule(registry.Defaults.Accept, registry.Defaults.Margin, accepts, margins);
    }

    /// <summary>The accept threshold in force for <paramref name="taskId"/>.</summary>
    public float AcceptFor(string? taskId)
        => taskId is not null && AcceptOverrides.TryGetValue(taskId, out float a) ? a : Accept;

    /// <summary>The margin in force for <paramref name="taskId"/>.</summary>
    public float MarginFor(string? taskId)
        => taskId is not null && MarginOverrides.TryGetValue(taskId, out float m) ? m : Margin;

    /// <summary>Decides one probe (see the remarks of <see cref="DecisionRule"/> for the order of the steps).</summary>
    /// <exception cref="ArgumentNullException"><paramref name="probe"/> is null.</exception>
    /// <exception cref="ArgumentException">The probe claims an exact match but names no best task.</exception>
    public RuleDecision Apply(ScoredProbe probe)
    {
        ArgumentNullException.ThrowIfNull(probe);
        if (probe.ExactMatch)
        {
            if (probe.BestTask is null)
            {
                throw new ArgumentException(
                    $"The scored probe for \"{probe.Probe.Utterance}\" (line {probe.Probe.Line}) is marked as an exact match but names no best task; " +
                    "an exact match must carry the id of the task whose phrase it matched.", nameof(probe));
            }
            return new RuleDecision(ResolutionOutcome.Accepted, probe.BestTask);
        }
        if (probe.GuardRejected || probe.BestTask is null) return new RuleDecision(ResolutionOutcome.Rejected, null);
        if (!(probe.BestScore >= AcceptFor(probe.BestTask))) return new RuleDecision(ResolutionOutcome.Rejected, null);
        if (probe.RunnerUpTask is not null && !(probe.BestScore - probe.RunnerUpScore >= MarginFor(probe.BestTask)))
        {
            return new RuleDecision(ResolutionOutcome.Ambiguous, probe.BestTask);
        }
        return new RuleDecision(ResolutionOutcome.Accepted, probe.BestTask);
    }

    /// <inheritdoc/>
    public override string ToString()
    {
        string overrides = AcceptOverrides.Count == 0 ? "" :
            ", " + string.Join(", ", AcceptOverrides.OrderBy(p => p.Key, StringComparer.Ordinal).Select(p => $"{p.Key}: accept {Format(p.Value)}"));
        return $"accept {Format(Accept)}, margin {Format(Margin)}{overrides}";
    }

    internal static string Format(float value) => value.ToString(System.Globalization.CultureInfo.InvariantCulture);

    private static IReadOnlyDictionary<string, float> Copy(IReadOnlyDictionary<string, float>? source, string parameter,
        Action<float, string, string?> check)
    {
        if (source is null || source.Count == 0) return NoOverrides;
        var copy = new Dictionary<string, float>(StringComparer.Ordinal);
        foreach (var (id, value) in source)
        {
            ArgumentException.ThrowIfNullOrEmpty(id, parameter);
            check(value, parameter, id);
            copy[id] = value;
        }
        return new ReadOnlyDictionary<string, float>(copy);
    }

    private static void CheckAccept(float value, string parameter, string? taskId)
    {
        if (!float.IsFinite(value))
        {
            throw new ArgumentOutOfRangeException(parameter, value,
                $"The accept threshold{ForTask(taskId)} must be a finite number; got {value}.");
        }
    }

    private static void CheckMargin(float value, string parameter, string? taskId)
    {
        if (!float.IsFinite(value) || value < 0)
        {
            throw new ArgumentOutOfRangeException(parameter, value,
                $"The margin{ForTask(taskId)} must be a finite number of at least 0; got {value}.");
        }
    }

    private static string ForTask(string? taskId) => taskId is null ? "" : $" of task '{taskId}'";
}
