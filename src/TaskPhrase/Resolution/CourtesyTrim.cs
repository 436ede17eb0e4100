using TaskPhrase.Text;

namespace TaskPhrase.Resolution;

/// <summary>
/// Drops courtesy words at the edges of a command ("ok, hang up my keys, thanks" → "hang up my keys"; "could you
/// water the basil please" → "water the basil"). Only fixed phrases at the start or end go, never a word inside the
/// command, never a negation, and at least two words always remain. Used by the resolver's second chance for
/// out-of-scope rejections (an exact match is then looked up on the trimmed words).
/// </summary>
internal static class CourtesyTrim
{
    private static readonly string[][] Leading = Split(
        "could you please", "can you please", "would you please", "will you please", "please could you", "please can you",
        "please would you", "i'd like you to", "i want you to", "i need you to", "could you", "can you", "would you",
        "will you", "ok so", "okay so", "ok", "okay", "right", "hey", "so", "please", "kindly");

    private static readonly string[][] Trailing = Split(
        "for me please", "thanks a lot", "thank you", "right now", "now please", "if you can", "if you could",
        "if you would", "would you", "could you", "will you", "for me", "please", "thanks", "cheers", "now", "ta");

    /// <summary>The words of <paramref name="text"/> without edge courtesy phrases, or null when none were found.</summary>
    public static (string Text, IReadOnlyList<string> Dropped)? Trim(string text)
    {
        var words = WordStemmer.Words(text);
        int start = 0, end = words.Count;
        var dropped = new List<string>();
        bool changed = true;
        while (changed)
        {
            changed = false;
            foreach (var p in Leading)
            {
                if (end - start - p.Length < 2 || !Matches(words, start, p)) continue;
                dropped.Add(string.Join(' ', p));
                start += p.Length;
                changed = true;
                break;
            }
            foreach (var p in Trailing)
            {
                if (end - start - p.Length < 2 || !Matches(words, end - p.Length, p)) continue;
                dropped.Add(string.Join(' ', p));
                end -= p.Length;
                changed = true;
                break;
            }
        }
        if (dropped.Count == 0) return null;
        return (string.Join(' ', words.Skip(start).Take(end - start)), dropped);
    }

    private static bool Matches(IReadOnlyList<string> words, int at, string[] phrase)
    {
        for (int i = 0; i < phrase.Length; i++)
            if (!string.Equals(words[at + i], phrase[i], StringComparison.Ordinal)) return false;
        return true;
    }

    private static string[][] Split(params string[] phrases) => phrases.Select(p => p.Split(' ')).ToArray();
}
