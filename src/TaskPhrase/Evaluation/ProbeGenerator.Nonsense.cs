using System.Text;

namespace TaskPhrase.Evaluation;

public static partial class ProbeGenerator
{
    /// <summary>One to four pronounceable nonsense words of two or three consonant-vowel(-consonant) syllables.</summary>
    internal static Candidate? PseudoWords(Pcg32 rng, Context context)
    {
        int count = rng.Between(1, 4);
        var words = new string[count];
        for (int i = 0; i < count; i++)
        {
            var sb = new StringBuilder();
            int syllables = rng.Between(2, 3);
            for (int s = 0; s < syllables; s++)
            {
                sb.Append(ProbeLexicon.Consonants[rng.Next(ProbeLexicon.Consonants.Length)]);
                sb.Append(ProbeLexicon.Vowels[rng.Next(ProbeLexicon.Vowels.Length)]);
                if (rng.Chance(0.3)) sb.Append(ProbeLexicon.Consonants[rng.Next(ProbeLexicon.Consonants.Length)]);
            }
            words[i] = sb.ToString();
            if (context.Vocabulary.Contains(words[i])) return null;
        }
        return new Candidate(string.Join(' ', words), ProbeCase.Reject, $"pseudo-word: {count} made-up word{(count == 1 ? "" : "s")} of consonant-vowel syllables");
    }

    /// <summary>Keyboard mashing: a run of neighbouring keys, an alternating pair, two runs, or random keys of one row.</summary>
    internal static Candidate? KeyboardMash(Pcg32 rng)
    {
        string row = rng.Pick(ProbeLexicon.KeyboardRows);
        string text, what;
        switch (rng.Next(4))
        {
            case 0:
            {
                int length = rng.Between(4, row.Length);
                int start = rng.Next(row.Length - length + 1);
                text = row.Substring(start, length);
                if (rng.Chance(0.3)) text = new string(text.Reverse().ToArray());
                what = "run of neighbouring keys";
                break;
            }
            case 1:
            {
                int pos = rng.Next(row.Length - 1);
                text = string.Concat(Enumerable.Repeat(row.Substring(pos, 2), rng.Between(3, 5)));
                what = "alternating pair";
                break;
            }
            case 2:
            {
                int a = rng.Between(3, 5), b = rng.Between(3, 5);
                text = row[..a] + " " + row[^b..];
                what = "both hands on one row";
                break;
            }
            default:
            {
                var sb = new StringBuilder();
                int length = rng.Between(5, 10);
                for (int i = 0; i < length; i++) sb.Append(row[rng.Next(row.Length)]);
                text = sb.ToString();
                what = "random keys of one row";
                break;
            }
        }
        return new Candidate(text, ProbeCase.Reject, $"keyboard-mash: {what}");
    }

    /// <summary>One registry word repeated two to six times.</summary>
    internal static Candidate? Repeated(Pcg32 rng, Context context)
    {
        var pool = context.ContentWords.Length > 0 ? context.ContentWords : context.VocabularyList;
        if (pool.Length == 0) return null;
        string word = rng.Pick(pool);
        int times = rng.Between(2, 6);
        return new Candidate(string.Join(' ', Enumerable.Repeat(word, times)), ProbeCase.Reject, $"repeated: '{word}' {times} times");
    }

    /// <summary>One to four symbol pieces (punctuation runs and emoji), with or without spaces.</summary>
    internal static Candidate? Symbols(Pcg32 rng)
    {
        int count = rng.Between(1, 4);
        string separator = rng.Chance(0.5) ? " " : "";
        var pieces = Enumerable.Range(0, count).Select(_ => rng.Pick(ProbeLexicon.SymbolPieces));
        return new Candidate(string.Join(separator, pieces), ProbeCase.Reject, "symbols: emoji and punctuation only");
    }

    /// <summary>
    /// The out-of-domain bank in a seeded order, leaving out any request whose content words one task's vocabulary
    /// covers entirely (it might be a task of this registry).
    /// </summary>
    private static IEnumerable<Candidate?> OutOfDomain(Pcg32 rng, Context context)
    {
        var order = OutOfDomainBank.Requests.ToArray();
        for (int i = order.Length - 1; i > 0; i--)
        {
            int j = rng.Next(i + 1);
            (order[i], order[j]) = (order[j], order[i]);
        }
        foreach (string request in order)
        {
            yield return context.CoveredBySingleTask(WordsOf(request))
                ? null
                : new Candidate(request, ProbeCase.Reject, "out-of-domain: a request the arm was never taught");
        }
    }
}
