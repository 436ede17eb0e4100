using TaskPhrase.Evaluation;

namespace TaskPhrase.Tests.Evaluation;

public class ProbeGeneratorMutationTests
{
    private static readonly string[] HarborPhrases = ProbeGeneratorTestRegistry.Harbor().Tasks.SelectMany(t => t.Phrases).ToArray();

    private static IEnumerable<(ProbeGenerator.Phrase Phrase, Pcg32 Rng)> Draws(int perPhrase = 40)
    {
        ulong seed = 0;
        foreach (string text in HarborPhrases)
        {
            var phrase = new ProbeGenerator.Phrase("task", text);
            for (int i = 0; i < perPhrase; i++) yield return (phrase, new Pcg32(seed++, 3));
        }
    }

    /// <summary>
    /// Unrestricted Damerau-Levenshtein distance (Lowrance and Wagner 1975, "An Extension of the String-to-String
    /// Correction Problem", J. ACM 22(2)): insertions, deletions, substitutions and transpositions of adjacent
    /// characters, each costing 1. Unlike the restricted (optimal string alignment) variant it is a metric, so two
    /// edits are never more than distance 2.
    /// </summary>
    private static int DamerauLevenshtein(string a, string b)
    {
        var lastRow = new Dictionary<char, int>();
        int max = a.Length + b.Length;
        var d = new int[a.Length + 2, b.Length + 2];
        d[0, 0] = max;
        for (int i = 0; i <= a.Length; i++) { d[i + 1, 0] = max; d[i + 1, 1] = i; }
        for (int j = 0; j <= b.Length; j++) { d[0, j + 1] = max; d[1, j + 1] = j; }
        for (int i = 1; i <= a.Length; i++)
        {
            int lastMatchColumn = 0;
            for (int j = 1; j <= b.Length; j++)
            {
                int k = lastRow.GetValueOrDefault(b[j - 1]);
                int l = lastMatchColumn;
                int cost = a[i - 1] == b[j - 1] ? 0 : 1;
                if (cost == 0) lastMatchColumn = j;
                d[i + 1, j + 1] = Math.Min(Math.Min(d[i, j] + cost, d[i + 1, j] + 1), Math.Min(d[i, j + 1] + 1,
                    d[k, l] + (i - k - 1) + 1 + (j - l - 1)));
            }
            lastRow[a[i - 1]] = i;
        }
        return d[a.Length + 1, b.Length + 1];
    }

    [Theory]
    // Textbook values: "ca" -> "abc" is 2 with unrestricted transpositions (3 in the restricted variant);
    // "kitten" -> "sitting" is 3 (Levenshtein's classic example); "abcd" -> "acbd" is 1.
    [InlineData("ca", "abc", 2)]
    [InlineData("kitten", "sitting", 3)]
    [InlineData("abcd", "acbd", 1)]
    public void DamerauLevenshtein_KnownPairs_GiveKnownDistance(string a, string b, int expected)
        => Assert.Equal(expected, DamerauLevenshtein(a, b));

    [Fact]
    public void Typo_AnyPhrase_MakesOneOrTwoEditsInLongWords()
    {
        int made = 0;
        foreach (var (phrase, rng) in Draws())
        {
            var c = ProbeGenerator.Typo(phrase, rng);
            if (c is null) continue;
            made++;
            string source = string.Join(' ', phrase.Words);
            Assert.InRange(DamerauLevenshtein(source, c.Utterance), 1, 2);
            var after = c.Utterance.Split(' ');
            Assert.Equal(phrase.Words.Length, after.Length);
            for (int i = 0; i < after.Length; i++)
            {
                if (after[i] != phrase.Words[i]) Assert.True(phrase.Words[i].Length >= 4, $"'{phrase.Words[i]}' is shorter than four letters");
            }
            Assert.DoesNotContain(after, w => w is "not" or "no" or "never" or "dont");
        }
        Assert.True(made > HarborPhrases.Length * 30, $"only {made} typos made");
    }

    [Fact]
    public void AsrSlip_AnyPhrase_IsExactlyOneDocumentedSlip()
    {
        var context = ProbeGeneratorTestContext();
        var groups = ProbeLexicon.SoundAlikes;
        foreach (var (phrase, rng) in Draws())
        {
            var c = ProbeGenerator.AsrSlip(phrase, rng, context);
            if (c is null) continue;
            var s = phrase.Words;
            var r = c.Utterance.Split(' ');
            bool soundAlike = r.Length == s.Length && Enumerable.Range(0, s.Length).Count(i => s[i] != r[i]) == 1
                && Enumerable.Range(0, s.Length).Where(i => s[i] != r[i]).All(i => groups.Any(g => g.Contains(s[i]) && g.Contains(r[i])));
            bool dropped = r.Length == s.Length - 1 && Enumerable.Range(0, s.Length)
                .Any(i => ProbeLexicon.Droppable.Contains(s[i]) && s.Where((_, k) => k != i).SequenceEqual(r));
            bool merged = r.Length == s.Length - 1 && Enumerable.Range(0, s.Length - 1)
                .Any(i => s[..i].Append(s[i] + s[i + 1]).Concat(s[(i + 2)..]).SequenceEqual(r));
            bool split = r.Length == s.Length + 1 && Enumerable.Range(0, s.Length)
                .Any(i => ProbeLexicon.Compounds.Any(p => p.Whole == s[i] && s[..i].Concat(p.Split.Split(' ')).Concat(s[(i + 1)..]).SequenceEqual(r)));
            Assert.True(soundAlike || dropped || merged || split, $"'{c.Utterance}' from '{phrase.Text}' is none of the slips");
        }
    }

    [Fact]
    public void HarmlessExtra_AnyPhrase_KeepsThePhraseAndAddsListedWords()
    {
        foreach (var (phrase, rng) in Draws(10))
        {
            var c = ProbeGenerator.HarmlessExtra(phrase, rng)!;
            int at = c.Utterance.IndexOf(phrase.Core, StringComparison.Ordinal);
            Assert.True(at >= 0, $"'{c.Utterance}' lost '{phrase.Core}'");
            string prefix = c.Utterance[..at].Trim(), suffix = c.Utterance[(at + phrase.Core.Length)..].Trim();
            Assert.True(prefix.Length + suffix.Length > 0);
            if (prefix.Length > 0) Assert.Contains(prefix, ProbeLexicon.ExtraPrefixes);
            if (suffix.Length > 0) Assert.Contains(suffix, ProbeLexicon.ExtraSuffixes);
        }
    }

    [Theory]
    [InlineData("pour hot water from the kettle into the teapot", "pour", "the hot water", "the teapot")]
    [InlineData("bring me the phone from the charger", "bring", "the phone", null)]
    [InlineData("could you water the basil on the kitchen windowsill please", "water", "the basil", "the kitchen windowsill")]
    [InlineData("hand over the tv remote", "hand over", "the tv remote", null)]
    [InlineData("open or close the window latch", "open", "the window latch", null)]
    [InlineData("pick the letters up off the door mat", "pick", "the letters", null)]
    [InlineData("open today's compartment of the pill organizer", "open", "today's compartment", null)]
    [InlineData("pull the blanket over my knees", "pull", "the blanket", "my knees")]
    [InlineData("feed the fish", "feed", "the fish", null)]
    public void Phrase_Heuristic_FindsVerbObjectAndDestination(string text, string verb, string obj, string? destination)
    {
        var p = new ProbeGenerator.Phrase("task", text);
        Assert.Equal(verb, p.Span(p.CoreStart, p.VerbEnd));
        Assert.Equal(obj, p.ObjectWithDeterminer);
        Assert.Equal(destination, p.DestinationStart < 0 ? null : p.Span(p.DestinationStart, p.DestinationEnd));
    }

    [Fact]
    public void Phrase_PolitenessAround_IsLeftOutOfCore()
        => Assert.Equal("water the basil", new ProbeGenerator.Phrase("task", "Could you water the basil, please?").Core);

    private static ProbeGenerator.Context ProbeGeneratorTestContext() => new(ProbeGeneratorTestRegistry.Harbor());
}
