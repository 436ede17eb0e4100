using TaskPhrase.Text;

namespace TaskPhrase.Resolution;

/// <summary>
/// Harmful actions and harmful targets for an assistive arm. An utterance whose content words, not covered by
/// the matched task's own vocabulary, include one of these is rejected with <see cref="RejectionReason.Hazard"/>.
/// Words are matched by Snowball stem. Immutable and thread-safe; registries extend it with
/// <c>hazard_words</c> and remove built-in words with <c>allow_words</c>.
/// </summary>
public sealed class HazardLexicon
{
    /// <summary>Built-in harmful action words (verbs of striking, cutting, throwing, spilling, burning, squeezing, aiming).</summary>
    public static IReadOnlyList<string> BuiltInActions { get; } =
    [
        "throw", "toss", "fling", "hurl", "chuck", "lob", "hit", "strike", "smack", "slap", "whack", "bash", "bang",
        "stab", "poke", "jab", "prod", "pierce", "cut", "slice", "slash", "chop", "smash", "crush", "break", "shatter",
        "drop", "dump", "spill", "splash", "spray", "squirt", "douse", "drench", "soak", "flood", "scald", "burn",
        "push", "shove", "punch", "kick", "knock", "ram", "squeeze", "pinch", "choke", "strangle", "yank",
        "twist", "wrench", "bend", "snap", "rip", "tear", "shake", "swing", "wave", "point", "aim", "fire", "shoot",
        "ignite", "light", "melt", "hurt", "harm", "injure", "attack", "kill", "destroy", "wreck",
        "empty", "tip", "overturn", "topple",
    ];

    /// <summary>Built-in harmful targets: body parts, people and animals an arm must not aim at.</summary>
    public static IReadOnlyList<string> BuiltInTargets { get; } =
    [
        "face", "eye", "eyes", "head", "mouth", "nose", "ear", "neck", "throat", "hands", "finger", "fingers",
        "leg", "legs", "foot", "feet", "skin", "body", "chest", "stomach", "lap", "hair", "someone",
        "somebody", "person", "people", "carer", "nurse", "visitor", "child", "baby", "cat", "dog", "yourself", "myself",
    ];

    private readonly HashSet<string> _stems;
    private readonly Dictionary<string, string> _wordOfStem;

    private HazardLexicon(IEnumerable<string> words)
    {
        _stems = new HashSet<string>(StringComparer.Ordinal);
        _wordOfStem = new Dictionary<string, string>(StringComparer.Ordinal);
        foreach (var w in words)
        {
            string stem = WordStemmer.Stem(w.ToLowerInvariant());
            if (_stems.Add(stem)) _wordOfStem[stem] = w;
        }
        Words = _wordOfStem.Values.Order(StringComparer.Ordinal).ToArray();
    }

    /// <summary>The built-in lexicon: <see cref="BuiltInActions"/> and <see cref="BuiltInTargets"/>.</summary>
    public static HazardLexicon BuiltIn { get; } = new(BuiltInActions.Concat(BuiltInTargets));

    /// <summary>The words in force, sorted.</summary>
    public IReadOnlyList<string> Words { get; }

    /// <summary>A lexicon with <paramref name="add"/> added and <paramref name="remove"/> taken out (compared by stem).</summary>
    public HazardLexicon With(IEnumerable<string> add, IEnumerable<string> remove)
    {
        ArgumentNullException.ThrowIfNull(add);
        ArgumentNullException.ThrowIfNull(remove);
        var removed = new HashSet<string>(remove.Select(w => WordStemmer.Stem(w.ToLowerInvariant())), StringComparer.Ordinal);
        return new HazardLexicon(Words.Concat(add).Where(w => !removed.Contains(WordStemmer.Stem(w.ToLowerInvariant()))));
    }

    /// <summary>True when the stem is a hazard stem.</summary>
    public bool ContainsStem(string stem) => _stems.Contains(stem);

    /// <summary>The first hazard word among <paramref name="words"/> (compared by stem), or null.</summary>
    public string? FindIn(IEnumerable<string> words)
    {
        ArgumentNullException.ThrowIfNull(words);
        foreach (var w in words)
            if (_stems.Contains(WordStemmer.Stem(w))) return w;
        return null;
    }
}
