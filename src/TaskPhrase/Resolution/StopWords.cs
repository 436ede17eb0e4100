namespace TaskPhrase.Resolution;

/// <summary>
/// Function words and politeness words that carry no task content ("please", "could", "the", "for me", …).
/// They are dropped before the lexical coverage check, so harmless extras never count as uncovered.
/// </summary>
public static class StopWords
{
    private static readonly HashSet<string> WordSet = new(StringComparer.Ordinal)
    {
        "a", "an", "the", "this", "that", "these", "those", "my", "your", "our", "his", "her", "their", "its", "it", "it's",
        "i", "i'd", "i'm", "i'll", "i've", "me", "you", "we", "us", "he", "she", "they", "them", "mine", "yours",
        "please", "pls", "plz", "thanks", "thank", "cheers", "kindly", "could", "would", "can", "will", "shall", "should",
        "may", "might", "must", "do", "does", "did", "be", "is", "are", "was", "were", "am", "been", "being", "have", "has",
        "had", "get", "got", "let", "let's", "lets", "want", "wanna", "need", "like", "love", "go", "going", "gonna",
        "to", "of", "for", "in", "on", "at", "by", "with", "from", "into", "onto", "over", "under", "up", "down", "off",
        "out", "about", "around", "through", "and", "or", "but", "so", "then", "now", "just", "again", "also", "too",
        "very", "really", "quite", "bit", "little", "some", "any", "all", "more", "much", "there", "here", "where",
        "when", "what", "which", "who", "how", "why", "if", "as", "than", "one", "ok", "okay", "yes", "yeah", "hey",
        "hi", "hello", "oh", "um", "uh", "er", "erm", "hmm", "right", "now", "time", "moment", "quick", "quickly",
        "soon", "today", "tonight", "morning", "evening", "maybe", "perhaps", "think", "help", "mind", "able", "ready",
        "done", "dear", "darling", "robot", "arm", "assistant", "thing", "things", "something", "stuff",
    };

    private static readonly HashSet<string>.AlternateLookup<ReadOnlySpan<char>> Lookup = WordSet.GetAlternateLookup<ReadOnlySpan<char>>();

    /// <summary>The stop list (lower case).</summary>
    public static IReadOnlySet<string> Words => WordSet;

    /// <summary>True when <paramref name="word"/> (lower case) is a stop word.</summary>
    public static bool Contains(string word) => Words.Contains(word);

    /// <summary>True when <paramref name="word"/> (lower case) is a stop word.</summary>
    internal static bool Contains(ReadOnlySpan<char> word) => Lookup.Contains(word);
}
