using CsCheck;
using TaskPhrase.Text;

namespace TaskPhrase.Tests.Text;

/// <summary>
/// The plain-ASCII shortcuts of the normaliser against its full Unicode route (differential testing, common practice):
/// <see cref="TextNormalizer.Normalize"/> against <see cref="TextNormalizer.NormalizeUnicode"/>, and the stack-built
/// match key against <see cref="TextNormalizer.MatchKey"/> as documented (the normalised text lower-cased with the
/// invariant culture, normalised again, edge punctuation, symbols and spaces removed), on the CLINC150 utterances
/// (Larson et al., 2019), the Harbor Street probes and generated ASCII and near-ASCII text.
/// </summary>
public class PlainAsciiTests
{
    private static IEnumerable<string> Corpus()
        => new[] { "train", "val", "oos_train", "oos_val" }.SelectMany(s => Clinc150.Split(s)).Select(r => r.Text)
            .Concat(File.ReadLines(TestPaths.Example("harbor-street", "probes.csv")).Skip(1).Select(l => l.Split(',')[0]))
            .Concat(["  Water the BASIL. ", "water  the basil", "\"water the basil\"", "...", "x", "Tab\there", "caf\u00E9", "A\u0301", "-- hi --"]);

    [Fact]
    public void Normalize_Corpus_EqualsUnicodeRoute()
    {
        int plain = 0;
        foreach (var text in Corpus())
        {
            Assert.Equal(TextNormalizer.NormalizeUnicode(text), TextNormalizer.Normalize(text));
            if (TextNormalizer.IsPlainAscii(text)) plain++;
        }
        Assert.True(plain > 15_000, $"only {plain} plain-ASCII texts");
    }

    [Fact]
    public void Normalize_GeneratedText_EqualsUnicodeRoute()
        => Gen.Char["aZ9 .,!?'\"-\t\u0000\u007F\u00A0\u00E9\u0301\u200B~`@"].Array[0, 30].Select(c => new string(c))
            .Sample(text => Assert.Equal(TextNormalizer.NormalizeUnicode(text), TextNormalizer.Normalize(text)), iter: 5000);

    [Fact]
    public void PlainMatchKey_Corpus_EqualsMatchKey()
    {
        var buffer = new char[512];
        int checkedKeys = 0;
        foreach (var text in Corpus().Concat(Generated()))
        {
            int length = TextNormalizer.PlainMatchKey(text, buffer);
            if (length < 0)
            {
                Assert.False(TextNormalizer.IsPlainAscii(text) && text.Length <= buffer.Length, $"'{text}' is plain ASCII but got no key");
                continue;
            }
            Assert.Equal(ReferenceKey(text), new string(buffer, 0, length));
            Assert.Equal(TextNormalizer.MatchKey(text), new string(buffer, 0, length));
            checkedKeys++;
        }
        Assert.True(checkedKeys > 15_000, $"only {checkedKeys} keys checked");
    }

    [Fact]
    public void PlainMatchKey_TooLong_Declines()
        => Assert.Equal(-1, TextNormalizer.PlainMatchKey(new string('a', 20), new char[10]));

    private static IEnumerable<string> Generated()
    {
        var random = new Random(11);
        const string alphabet = "aZq9 .,!?'\"-()[]#$%&*+/:;<=>@\\^_`{|}~";
        for (int i = 0; i < 3000; i++)
        {
            var chars = new char[random.Next(0, 25)];
            for (int k = 0; k < chars.Length; k++) chars[k] = alphabet[random.Next(alphabet.Length)];
            yield return new string(chars);
        }
    }

    /// <summary>The match key by its definition, through the Unicode route only.</summary>
    private static string ReferenceKey(string text)
    {
        string n = TextNormalizer.NormalizeUnicode(TextNormalizer.NormalizeUnicode(text).ToLowerInvariant());
        int start = 0, end = n.Length;
        while (start < end && IsEdge(n[start])) start++;
        while (end > start && IsEdge(n[end - 1])) end--;
        return n.Substring(start, end - start);

        static bool IsEdge(char c) => char.IsPunctuation(c) || char.IsSymbol(c) || c == ' ';
    }
}
