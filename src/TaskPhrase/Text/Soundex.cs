namespace TaskPhrase.Text;

/// <summary>
/// American Soundex (R. C. Russell, 1918; the coding rules of the U.S. National Archives' "The Soundex Indexing
/// System"): the first letter, then up to three digits for the following consonant sounds
/// (b f p v → 1; c g j k q s x z → 2; d t → 3; l → 4; m n → 5; r → 6), adjacent letters with the same digit coded once,
/// also across h and w but not across vowels; padded with zeros to four characters. Thread-safe and allocation-free.
/// </summary>
public static class Soundex
{
    /// <summary>
    /// Writes the four-character code of <paramref name="word"/> into <paramref name="code"/> and returns true, or
    /// returns false when the word does not start with an ASCII letter (non-letters after the first are skipped).
    /// </summary>
    /// <exception cref="ArgumentException"><paramref name="code"/> is shorter than four characters.</exception>
    public static bool TryEncode(ReadOnlySpan<char> word, Span<char> code)
    {
        if (code.Length < 4) throw new ArgumentException("The code needs room for four characters.", nameof(code));
        if (word.IsEmpty || !char.IsAsciiLetter(word[0])) return false;
        code[0] = char.ToUpperInvariant(word[0]);
        char previous = Digit(word[0]);
        int n = 1;
        for (int i = 1; i < word.Length && n < 4; i++)
        {
            char c = char.ToLowerInvariant(word[i]);
            if (!char.IsAsciiLetter(c)) continue;
            char d = Digit(c);
            if (d != '0' && d != previous) code[n++] = d;
            if (c is not ('h' or 'w')) previous = d;
        }
        for (; n < 4; n++) code[n] = '0';
        return true;
    }

    /// <summary>The four-character code of <paramref name="word"/>, or null when it does not start with an ASCII letter.</summary>
    /// <exception cref="ArgumentNullException"><paramref name="word"/> is null.</exception>
    public static string? Encode(string word)
    {
        ArgumentNullException.ThrowIfNull(word);
        Span<char> code = stackalloc char[4];
        return TryEncode(word, code) ? new string(code) : null;
    }

    /// <summary>The Soundex digit of a lower- or upper-case ASCII letter; '0' for vowels, h, w and y.</summary>
    private static char Digit(char c) => char.ToLowerInvariant(c) switch
    {
        'b' or 'f' or 'p' or 'v' => '1',
        'c' or 'g' or 'j' or 'k' or 'q' or 's' or 'x' or 'z' => '2',
        'd' or 't' => '3',
        'l' => '4',
        'm' or 'n' => '5',
        'r' => '6',
        _ => '0',
    };
}
