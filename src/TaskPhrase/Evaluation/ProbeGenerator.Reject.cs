namespace TaskPhrase.Evaluation;

public static partial class ProbeGenerator
{
    /// <summary>The phrase (without politeness words) under a negation template.</summary>
    internal static Candidate? Negated(Phrase phrase, Pcg32 rng)
    {
        if (phrase.Words.Any(ProbeLexicon.NegationCues.Contains)) return null;
        string template = rng.Pick(ProbeLexicon.NegationTemplates);
        return new Candidate(string.Format(System.Globalization.CultureInfo.InvariantCulture, template, phrase.Core), ProbeCase.Reject,
            $"negated: '{template.Replace("{0}", "…", StringComparison.Ordinal)}' around '{phrase.Text}'");
    }

    /// <summary>The object noun phrase replaced by a household object the registry does not mention.</summary>
    internal static Candidate? ObjectSwap(Phrase phrase, Pcg32 rng, Context context)
    {
        if (!phrase.HasObject) return null;
        var objects = ProbeLexicon.HouseholdObjects.Where(o => !o.Split(' ').Any(context.Vocabulary.Contains)).ToArray();
        if (objects.Length == 0) return null;
        string obj = rng.Pick(objects);
        string determiner = phrase.ObjectStart == phrase.ObjectHeadStart ? "the" : phrase.Words[phrase.ObjectStart];
        string before = phrase.Span(phrase.ObjectHeadStart, phrase.ObjectEnd);
        string text = phrase.Replace(phrase.ObjectStart, phrase.ObjectEnd, determiner + " " + obj);
        return new Candidate(text, ProbeCase.Reject, $"object-swap: '{before}' -> '{obj}' in '{phrase.Text}'");
    }

    /// <summary>The task's object under a harmful action.</summary>
    internal static Candidate? HazardSwap(Phrase phrase, Pcg32 rng)
    {
        if (!phrase.HasObject) return null;
        string template = rng.Pick(ProbeLexicon.HazardTemplates);
        string obj = phrase.ObjectWithDeterminer;
        string verb = phrase.Span(phrase.CoreStart, phrase.VerbEnd);
        return new Candidate(string.Format(System.Globalization.CultureInfo.InvariantCulture, template, obj), ProbeCase.Reject,
            $"hazard-swap: '{verb}' replaced by '{template.Replace("{0}", "…", StringComparison.Ordinal)}' on '{obj}' from '{phrase.Text}'");
    }

    /// <summary>The task's action aimed at a person or body part: the destination replaced, else the object.</summary>
    internal static Candidate? TargetSwap(Phrase phrase, Pcg32 rng, Context context)
    {
        bool destination = phrase.DestinationStart >= 0;
        if (!destination && !phrase.HasObject) return null;
        var targets = ProbeLexicon.WrongTargets
            .Where(t => !t.Split(' ').Any(w => !ProbeLexicon.FunctionWords.Contains(w) && context.Vocabulary.Contains(w))).ToArray();
        if (targets.Length == 0) return null;
        string target = rng.Pick(targets);
        int start = destination ? phrase.DestinationStart : phrase.ObjectStart;
        int end = destination ? phrase.DestinationEnd : phrase.ObjectEnd;
        string before = phrase.Span(start, end);
        if (before == target) return null;
        return new Candidate(phrase.Replace(start, end, target), ProbeCase.Reject,
            $"target-swap: {(destination ? "destination" : "object")} '{before}' -> '{target}' in '{phrase.Text}'");
    }

    /// <summary>Three to seven registry words in random order, never in the order of an approved phrase.</summary>
    internal static Candidate? WordSalad(Pcg32 rng, Context context)
    {
        if (context.VocabularyList.Length < 2) return null;
        int n = rng.Between(3, 7);
        var words = new List<string>(n);
        while (words.Count < n)
        {
            string w = rng.Pick(context.VocabularyList);
            if (words.Count == 0 || words[^1] != w) words.Add(w);
        }
        // Words that appear in order inside one approved phrase could still read as that phrase.
        if (context.AllPhraseWords.Any(p => IsSubsequence(words, p))) return null;
        return new Candidate(string.Join(' ', words), ProbeCase.Reject, $"word-salad: {n} registry words in random order");
    }

    private static bool IsSubsequence(List<string> words, string[] phrase)
    {
        int k = 0;
        foreach (string p in phrase)
        {
            if (k < words.Count && words[k] == p) k++;
        }
        return k == words.Count;
    }
}
