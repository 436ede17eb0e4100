using TaskPhrase.Text;

namespace TaskPhrase.Resolution;

/// <summary>
/// Harmful actions and harmful targets for an assistive arm. An utterance whose content words, not covered by
/// the matched task's own vocabulary, include one of these is rejected with <see cref="RejectionReason.Hazard"/>.
/// Actions are matched by Snowball stem ("throwing" matches "throw"); targets by exact word form, since their stems
/// collide with harmless words ("facing" → "face", "personal" → "person"). Immutable and thread-safe; registries extend it with
/// <c>hazard_words</c> and remove built-in words with <c>allow_words</c>.
/// </summary>
public sealed class HazardLexicon
{
    /// <summary>Built-in harmful action words (verbs of striking, cutting, throwing, spilling, burning, squeezing, aiming).</summary>
    public static IReadOnlyList<string> BuiltInActions { get; } =
    [
        "throw", "toss", "fling", "hurl", "chuck", "lob", "hit", "strike", "smack", "slap", "whack", "bash", "bang",
        "stab", "poke", "jab", "prod", "pierce", "cut", "slice", "slash", "chop", "smash", "crush", "break", "shatter",
        "drop", "dump", "spill", "spray", "squirt", "douse", "drench", "soak", "flood", "scald", "burn",
        "push", "shove", "punch", "kick", "knock", "ram", "squeeze", "pinch", "choke", "strangle", "yank",
        "twist", "wrench", "bend", "snap", "rip", "tear", "shake", "swing", "wave", "point", "aim", "fire", "shoot",
        "ignite", "light", "melt", "hurt", "harm", "injure", "attack", "kill", "destroy", "wreck",
        "empty", "overturn", "topple",
    ];

    /// <summary>Built-in dangerous instruments: an arm holding one of these near a person is never a routine task.</summary>
    public static IReadOnlyList<string> BuiltInInstruments { get; } =
    [
        "knife", "knives", "blade", "razor", "scissors", "needle", "needles", "syringe", "skewer", "fork", "hammer",
        "screwdriver", "saw", "axe", "lighter", "matches", "candle", "flame", "gun", "bleach", "acid", "poison",
    ];

    /// <summary>Targets that count only after a possessive ("my hand", "her hand"), since alone they are common verbs ("hand me").</summary>
    public static IReadOnlyList<string> PossessiveTargets { get; } = ["hand", "head", "arm", "lap", "knee", "knees"];

    /// <summary>Built-in harmful targets: body parts and people an arm must not aim at.</summary>
    public static IReadOnlyList<string> BuiltInTargets { get; } =
    [
        "face", "eye", "eyes", "head", "mouth", "nose", "ear", "neck", "throat", "hands", "finger", "fingers",
        "leg", "legs", "foot", "feet", "skin", "body", "chest", "stomach", "lap", "hair", "someone",
        "somebody", "person", "carer", "nurse", "visitor", "child", "baby", "yourself", "myself",
    ];

    private readonly HashSet<string> _actionStems;
    private readonly HashSet<string> _targets;

    private HazardLexicon(IEnumerable<string> actions, IEnumerable<string> targets)
    {
        Actions = actions.Select(w => w.ToLowerInvariant()).Distinct().Order(StringComparer.Ordinal).ToArray();
        Targets = targets.Select(w => w.ToLowerInvariant()).Distinct().Order(StringComparer.Ordinal).ToArray();
        _actionStems = new HashSet<string>(Actions.Select(WordStemmer.Stem), StringComparer.Ordinal);
        _targets = new HashSet<string>(Targets, StringComparer.Ordinal);
    }

    /// <summary>The built-in lexicon: <see cref="BuiltInActions"/> and <see cref="BuiltInTargets"/>.</summary>
    public static HazardLexicon BuiltIn { get; } = new(BuiltInActions, BuiltInTargets.Concat(BuiltInInstruments));

    /// <summary>The action words in force (matched by stem), sorted.</summary>
    public IReadOnlyList<string> Actions { get; }

    /// <summary>The target words in force (matched exactly), sorted.</summary>
    public IReadOnlyList<string> Targets { get; }

    /// <summary>
    /// A lexicon with <paramref name="add"/> added as actions (matched by stem) and <paramref name="remove"/> taken
    /// out of both lists (actions compared by stem, targets by word).
    /// </summary>
    public HazardLexicon With(IEnumerable<string> add, IEnumerable<string> remove)
    {
        ArgumentNullException.ThrowIfNull(add);
        ArgumentNullException.ThrowIfNull(remove);
        var removedWords = remove.Select(w => w.ToLowerInvariant()).ToHashSet(StringComparer.Ordinal);
        var removedStems = removedWords.Select(WordStemmer.Stem).ToHashSet(StringComparer.Ordinal);
        return new HazardLexicon(
            Actions.Concat(add).Where(w => !removedStems.Contains(WordStemmer.Stem(w.ToLowerInvariant()))),
            Targets.Where(w => !removedWords.Contains(w)));
    }

    /// <summary>The first hazard word among <paramref name="words"/> (lower case), or null.</summary>
    public string? FindIn(IEnumerable<string> words)
    {
        ArgumentNullException.ThrowIfNull(words);
        if (words is string[] array)
        {
            // The resolver's path: no enumerator, and stems looked up as spans.
            var stems = _actionStems.GetAlternateLookup<ReadOnlySpan<char>>();
            foreach (var w in array)
                if (_targets.Contains(w) || stems.Contains(WordStemmer.StemSpan(w))) return w;
            return null;
        }
        foreach (var w in words)
            if (_targets.Contains(w) || _actionStems.Contains(WordStemmer.Stem(w))) return w;
        return null;
    }

    /// <summary>
    /// The first possessive target ("my hand", "your head") in the utterance's word sequence whose target word is not
    /// in <paramref name="covered"/> (the matched task's vocabulary stems), or null.
    /// </summary>
    public string? FindPossessiveTarget(IReadOnlyList<string> words, IReadOnlySet<string> covered)
    {
        ArgumentNullException.ThrowIfNull(words);
        ArgumentNullException.ThrowIfNull(covered);
        for (int i = 1; i < words.Count; i++)
        {
            if (!Possessives.Contains(words[i - 1]) || !PossessiveTargets.Contains(words[i])) continue;
            if (!covered.Contains(WordStemmer.Stem(words[i]))) return words[i - 1] + " " + words[i];
        }
        return null;
    }

    /// <summary><see cref="FindPossessiveTarget(IReadOnlyList{string}, IReadOnlySet{string})"/> over word spans; builds a string only for a hit.</summary>
    internal string? FindPossessiveTarget(in WordSpans words, HashSet<string> covered)
    {
        var possessives = Possessives.GetAlternateLookup<ReadOnlySpan<char>>();
        var stems = covered.GetAlternateLookup<ReadOnlySpan<char>>();
        for (int i = 1; i < words.Count; i++)
        {
            var target = words[i];
            if (!possessives.Contains(words[i - 1]) || !IsPossessiveTarget(target)) continue;
            if (!stems.Contains(WordStemmer.StemSpan(target))) return string.Concat(words[i - 1], " ", target);
        }
        return null;

        static bool IsPossessiveTarget(ReadOnlySpan<char> word)
        {
            for (int k = 0; k < PossessiveTargets.Count; k++)
                if (word.SequenceEqual(PossessiveTargets[k])) return true;
            return false;
        }
    }

    private static readonly HashSet<string> Possessives = new(StringComparer.Ordinal) { "my", "your", "her", "his", "their", "someone's", "somebody's", "noor's" };
}
