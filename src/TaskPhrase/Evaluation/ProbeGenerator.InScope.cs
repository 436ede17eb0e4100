namespace TaskPhrase.Evaluation;

public static partial class ProbeGenerator
{
    private static readonly Dictionary<string, string[]> SoundAlikeOf = BuildSoundAlikes();

    private static Dictionary<string, string[]> BuildSoundAlikes()
    {
        var map = new Dictionary<string, string[]>(StringComparer.Ordinal);
        foreach (var group in ProbeLexicon.SoundAlikes)
        {
            foreach (string word in group) map[word] = group.Where(w => w != word).ToArray();
        }
        return map;
    }

    /// <summary>One or two character edits (swap of neighbours, drop, doubling) in words of at least four letters.</summary>
    internal static Candidate? Typo(Phrase phrase, Pcg32 rng)
    {
        var eligible = Enumerable.Range(0, phrase.Words.Length).Where(i => phrase.Words[i].Length >= 4 && phrase.Words[i].All(char.IsLetter)).ToArray();
        if (eligible.Length == 0) return null;
        var words = (string[])phrase.Words.Clone();
        var done = new List<string>();
        int edits = rng.Between(1, 2);
        for (int e = 0; e < edits; e++)
        {
            int index = rng.Pick(eligible);
            string before = words[index];
            string after;
            string what;
            switch (rng.Next(3))
            {
                case 0 when before.Length >= 2:
                {
                    int pos = rng.Next(before.Length - 1);
                    if (before[pos] == before[pos + 1]) goto default;
                    after = string.Concat(before.AsSpan(0, pos), before[pos + 1].ToString(), before[pos].ToString(), before.AsSpan(pos + 2));
                    what = "swap";
                    break;
                }
                case 1 when before.Length >= 4:
                {
                    int pos = rng.Next(before.Length);
                    after = before.Remove(pos, 1);
                    what = "drop";
                    break;
                }
                default:
                {
                    int pos = rng.Next(before.Length);
                    after = before.Insert(pos, before[pos].ToString());
                    what = "double";
                    break;
                }
            }
            words[index] = after;
            done.Add($"'{before}' -> '{after}' ({what})");
        }
        if (words.SequenceEqual(phrase.Words) || words.Any(w => ProbeLexicon.NegationCues.Contains(w))) return null;
        return new Candidate(string.Join(' ', words), phrase.TaskId, $"typo: {string.Join(", ", done)} in '{phrase.Text}'");
    }

    /// <summary>One speech-recognition slip: a sound-alike word, a dropped function word, two words run together, or a word split.</summary>
    internal static Candidate? AsrSlip(Phrase phrase, Pcg32 rng, Context context)
    {
        var w = phrase.Words;
        var soundAlike = new List<(int Index, string Replacement)>();
        for (int i = 0; i < w.Length; i++)
        {
            if (!SoundAlikeOf.TryGetValue(w[i], out var options)) continue;
            // A replacement that is another task's word would make the expected task debatable; skip it.
            foreach (string o in options)
            {
                if (!context.BelongsToOtherTask(o, phrase.TaskId) && !ProbeLexicon.NegationCues.Contains(o)) soundAlike.Add((i, o));
            }
        }
        var drops = w.Length >= 3 ? Enumerable.Range(0, w.Length).Where(i => ProbeLexicon.Droppable.Contains(w[i])).ToArray() : [];
        var merges = Enumerable.Range(0, Math.Max(0, w.Length - 1))
            .Where(i => w[i].All(char.IsLetter) && w[i + 1].All(char.IsLetter) && Math.Min(w[i].Length, w[i + 1].Length) <= 5 && w[i].Length + w[i + 1].Length <= 12)
            .ToArray();
        var splits = Enumerable.Range(0, w.Length).SelectMany(i => ProbeLexicon.Compounds.Where(c => c.Whole == w[i]).Select(c => (Index: i, c.Split))).ToArray();

        var available = new List<int>();
        if (soundAlike.Count > 0) available.Add(0);
        if (drops.Length > 0) available.Add(1);
        if (merges.Length > 0) available.Add(2);
        if (splits.Length > 0) available.Add(3);
        if (available.Count == 0) return null;
        string text, what;
        switch (rng.Pick(available))
        {
            case 0:
            {
                var (i, r) = rng.Pick(soundAlike);
                text = phrase.Replace(i, i + 1, r);
                what = $"'{w[i]}' -> '{r}' (sound-alike)";
                break;
            }
            case 1:
            {
                int i = rng.Pick(drops);
                text = string.Join(' ', w.Where((_, k) => k != i));
                what = $"dropped '{w[i]}'";
                break;
            }
            case 2:
            {
                int i = rng.Pick(merges);
                text = phrase.Replace(i, i + 2, w[i] + w[i + 1]);
                what = $"'{w[i]} {w[i + 1]}' run together";
                break;
            }
            default:
            {
                var (i, split) = rng.Pick(splits);
                text = phrase.Replace(i, i + 1, split);
                what = $"'{w[i]}' -> '{split}' (split)";
                break;
            }
        }
        if (WordsOf(text).Any(x => ProbeLexicon.NegationCues.Contains(x))) return null;
        return new Candidate(text, phrase.TaskId, $"asr-slip: {what} in '{phrase.Text}'");
    }

    /// <summary>The phrase with harmless words in front, behind or both.</summary>
    internal static Candidate? HarmlessExtra(Phrase phrase, Pcg32 rng)
    {
        string core = phrase.Core;
        int mode = rng.Next(3);
        string prefix = mode != 1 ? rng.Pick(ProbeLexicon.ExtraPrefixes) : "";
        string suffix = mode != 0 ? rng.Pick(ProbeLexicon.ExtraSuffixes) : "";
        if (prefix == suffix) suffix = ""; // not "please … please"
        string text = string.Join(' ', new[] { prefix, core, suffix }.Where(s => s.Length > 0));
        string what = (prefix, suffix) switch
        {
            ("", _) => $"'{suffix}' after",
            (_, "") => $"'{prefix}' before",
            _ => $"'{prefix}' before and '{suffix}' after",
        };
        return new Candidate(text, phrase.TaskId, $"harmless-extra: {what} '{phrase.Text}'");
    }
}
