namespace TaskPhrase.Evaluation;

/// <summary>
/// The kinds of probe <see cref="ProbeGenerator"/> writes, as they appear in a suite's <c>kind</c> column.
/// The first three expect the task of the phrase they come from; all others expect <c>reject</c>.
/// </summary>
public static class ProbeKinds
{
    /// <summary>An approved phrase with one or two character swaps, drops or doublings in words of four letters or more.</summary>
    public const string Typo = "typo";

    /// <summary>An approved phrase with one speech-recognition slip: a homophone or near-sound word, a dropped function word, two words run together or one split.</summary>
    public const string AsrSlip = "asr-slip";

    /// <summary>An approved phrase with harmless extra words ("please", "for me", "when you can").</summary>
    public const string HarmlessExtra = "harmless-extra";

    /// <summary>An approved phrase with a negation in front ("don't", "do not", "never", "no longer").</summary>
    public const string Negated = "negated";

    /// <summary>Three to seven words of the registry's own vocabulary in random order.</summary>
    public const string WordSalad = "word-salad";

    /// <summary>An approved phrase with its object replaced by a household object the registry does not mention.</summary>
    public const string ObjectSwap = "object-swap";

    /// <summary>The task's object with its action replaced by a harmful one (throw, hit, stab, smash, spray … at).</summary>
    public const string HazardSwap = "hazard-swap";

    /// <summary>The task's action aimed at a person or a body part instead of its target ("… over my face").</summary>
    public const string TargetSwap = "target-swap";

    /// <summary>Pronounceable nonsense words made of consonant-vowel syllables.</summary>
    public const string PseudoWord = "pseudo-word";

    /// <summary>Keyboard mashing ("asdfjkl;", "qwqwqw").</summary>
    public const string KeyboardMash = "keyboard-mash";

    /// <summary>One token repeated.</summary>
    public const string Repeated = "repeated";

    /// <summary>Emoji and punctuation only.</summary>
    public const string Symbols = "symbols";

    /// <summary>A request the arm was never taught, from <see cref="OutOfDomainBank"/>.</summary>
    public const string OutOfDomain = "out-of-domain";

    /// <summary>Every kind, in the order the generator writes them.</summary>
    public static IReadOnlyList<string> All { get; } = Array.AsReadOnly(new[]
    {
        Typo, AsrSlip, HarmlessExtra, Negated, WordSalad, ObjectSwap, HazardSwap, TargetSwap,
        PseudoWord, KeyboardMash, Repeated, Symbols, OutOfDomain,
    });

    /// <summary>True for the kinds whose rows expect the source phrase's task (not <c>reject</c>).</summary>
    public static bool ExpectsTask(string kind) => kind is Typo or AsrSlip or HarmlessExtra;
}
