using TaskPhrase.Registry;
using TaskPhrase.Text;

namespace TaskPhrase.Resolution;

/// <summary>
/// Lint for task authors that needs no model: approved phrases that themselves contain a hazard word.
/// Such a word is then part of the task's vocabulary and no longer triggers the hazard check for it.
/// </summary>
public static class HazardLint
{
    /// <summary>Lint code of the finding.</summary>
    public const string Code = "phrase-has-hazard-word";

    /// <summary>One warning per approved phrase holding a word of the registry's hazard lexicon.</summary>
    public static IReadOnlyList<LintWarning> Check(TaskRegistry registry)
    {
        ArgumentNullException.ThrowIfNull(registry);
        var lexicon = HazardLexicon.BuiltIn.With(registry.Settings.HazardWords, registry.Settings.AllowWords);
        var warnings = new List<LintWarning>();
        foreach (var task in registry.Tasks)
        {
            foreach (var phrase in task.Phrases)
            {
                if (lexicon.FindIn(WordStemmer.Words(phrase)) is not { } word) continue;
                warnings.Add(new LintWarning(Code, task.Id, phrase, null, null, null,
                    $"task '{task.Id}': approved phrase \"{phrase}\" contains the hazard word '{word}'; the hazard check will not fire on '{word}' for this task. Reword the phrase, or list '{word}' under allow_words if it is harmless here."));
            }
        }
        return warnings;
    }
}
