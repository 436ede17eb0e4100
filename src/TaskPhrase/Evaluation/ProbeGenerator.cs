using TaskPhrase.Registry;
using TaskPhrase.Text;

namespace TaskPhrase.Evaluation;

/// <summary>
/// Generates adversarial probe suites from a registry: variations of approved phrases that should still
/// resolve to their task (typos, speech-recognition slips, harmless extra words) and inputs that must be
/// refused (negations, word salad, swapped objects, harmful actions, wrong targets, nonsense, symbols,
/// requests the arm was never taught). Each row carries its <c>kind</c> and a <c>note</c> saying what was done.
/// </summary>
/// <remarks>
/// <para>Deterministic: the same registry, seed and options give the same rows in the same order on every
/// platform. Randomness comes from a PCG32 generator written for this purpose (not <see cref="Random"/>),
/// with one stream per kind, so adding or removing a kind does not change the rows of the others.</para>
/// <para>Phrases are taken apart without a parser, by a documented heuristic: leading politeness words
/// ("could you", "please") are set aside; the first word is the verb, with a directly following particle
/// ("turn on", "hand over"); the object is the noun phrase after the first determiner or possessive that comes before any
/// preposition, or else the run of content words right after the verb, and its last word is taken as the head
/// noun; the destination is the noun phrase after the last preposition of place or direction ("into the teapot",
/// "over my knees"). Some rows come out awkward; that is accepted. What is guaranteed: no row equals an approved
/// phrase (compared by <see cref="TextNormalizer.MatchKey"/>), rows that expect a task never equal one of its
/// <c>must_reject</c> phrases, typos and slips never create a negation word, and rows are unique.</para>
/// <para>Rows are split evenly over the kinds; when a kind runs out of distinct rows (a small registry, the
/// out-of-domain bank), the shortfall is spread over the other kinds, so fewer than <c>Count</c> rows come back
/// only when every kind is exhausted. Stateless and thread-safe.</para>
/// </remarks>
public static partial class ProbeGenerator
{
    /// <summary>Draws in a row that may fail before a kind counts as exhausted.</summary>
    private const int MaxConsecutiveFailures = 400;

    /// <summary>A generated row before filtering.</summary>
    internal sealed record Candidate(string Utterance, string Expect, string Note);

    /// <summary>Generates a probe suite.</summary>
    /// <param name="registry">The registry whose phrases and vocabulary the probes are built from.</param>
    /// <param name="options">Seed, number of rows and kinds; null for the defaults.</param>
    /// <returns>The rows, grouped by kind in the order of <see cref="ProbeGeneratorOptions.Kinds"/>.</returns>
    /// <exception cref="ArgumentNullException"><paramref name="registry"/> is null.</exception>
    public static IReadOnlyList<ProbeCase> Generate(TaskRegistry registry, ProbeGeneratorOptions? options = null)
    {
        ArgumentNullException.ThrowIfNull(registry);
        options ??= new ProbeGeneratorOptions();
        var context = new Context(registry);
        var kinds = options.Kinds;
        var streams = kinds.Select(k => Stream(k, context, new Pcg32(options.Seed, Pcg32.StreamOf(k))).GetEnumerator()).ToArray();
        var rows = kinds.Select(_ => new List<ProbeCase>()).ToArray();
        var exhausted = new bool[kinds.Count];
        var seen = new HashSet<string>(StringComparer.Ordinal);

        for (int i = 0; i < kinds.Count; i++)
        {
            int quota = options.Count / kinds.Count + (i < options.Count % kinds.Count ? 1 : 0);
            Fill(i, quota);
        }
        int remaining = options.Count - rows.Sum(r => r.Count);
        while (remaining > 0 && exhausted.Any(e => !e))
        {
            for (int i = 0; i < kinds.Count && remaining > 0; i++)
            {
                if (!exhausted[i] && Fill(i, 1) == 1) remaining--;
            }
        }
        foreach (var stream in streams) stream.Dispose();
        return rows.SelectMany(r => r).ToList().AsReadOnly();

        int Fill(int kind, int wanted)
        {
            int got = 0, failures = 0;
            var stream = streams[kind];
            while (got < wanted && !exhausted[kind])
            {
                if (!stream.MoveNext())
                {
                    exhausted[kind] = true;
                    break;
                }
                var candidate = stream.Current;
                if (candidate is not null && Admit(candidate, kinds[kind]))
                {
                    rows[kind].Add(new ProbeCase(candidate.Utterance, candidate.Expect, kinds[kind], candidate.Note));
                    got++;
                    failures = 0;
                }
                else if (++failures >= MaxConsecutiveFailures)
                {
                    exhausted[kind] = true;
                }
            }
            return got;
        }

        bool Admit(Candidate c, string kind)
        {
            string normalized = TextNormalizer.Normalize(c.Utterance);
            if (normalized.Length == 0) return false;
            string key = TextNormalizer.MatchKey(normalized);
            if (key.Length > 0 && context.ApprovedKeys.Contains(key)) return false;
            if (ProbeKinds.ExpectsTask(kind) && context.MustRejectKeys.Contains(key)) return false;
            // Symbol-only rows have an empty match key; tell them apart by their normalised text.
            return seen.Add(key.Length > 0 ? key : "\u0001" + normalized.ToLowerInvariant());
        }
    }

    private static IEnumerable<Candidate?> Stream(string kind, Context context, Pcg32 rng) => kind switch
    {
        ProbeKinds.Typo => FromPhrases(context, rng, (p, r) => Typo(p, r)),
        ProbeKinds.AsrSlip => FromPhrases(context, rng, (p, r) => AsrSlip(p, r, context)),
        ProbeKinds.HarmlessExtra => FromPhrases(context, rng, (p, r) => HarmlessExtra(p, r)),
        ProbeKinds.Negated => FromPhrases(context, rng, (p, r) => Negated(p, r)),
        ProbeKinds.ObjectSwap => FromPhrases(context, rng, (p, r) => ObjectSwap(p, r, context)),
        ProbeKinds.HazardSwap => FromPhrases(context, rng, (p, r) => HazardSwap(p, r)),
        ProbeKinds.TargetSwap => FromPhrases(context, rng, (p, r) => TargetSwap(p, r, context)),
        ProbeKinds.WordSalad => Forever(() => WordSalad(rng, context)),
        ProbeKinds.PseudoWord => Forever(() => PseudoWords(rng, context)),
        ProbeKinds.KeyboardMash => Forever(() => KeyboardMash(rng)),
        ProbeKinds.Repeated => Forever(() => Repeated(rng, context)),
        ProbeKinds.Symbols => Forever(() => Symbols(rng)),
        ProbeKinds.OutOfDomain => OutOfDomain(rng, context),
        _ => throw new ArgumentException($"Unknown probe kind '{kind}'.", nameof(kind)),
    };

    /// <summary>Endless draws of one mutation applied to a random approved phrase (task first, then phrase, so tasks weigh alike).</summary>
    private static IEnumerable<Candidate?> FromPhrases(Context context, Pcg32 rng, Func<Phrase, Pcg32, Candidate?> mutate)
    {
        if (context.PhrasesByTask.Count == 0)
        {
            while (true) yield return null;
        }
        while (true)
        {
            var phrases = rng.Pick(context.PhrasesByTask);
            yield return mutate(rng.Pick(phrases), rng);
        }
    }

    private static IEnumerable<Candidate?> Forever(Func<Candidate?> draw)
    {
        while (true) yield return draw();
    }
}
