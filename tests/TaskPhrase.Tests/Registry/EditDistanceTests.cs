using TaskPhrase.Registry;

namespace TaskPhrase.Tests.Registry;

public class EditDistanceTests
{
    [Theory]
    // Worked example of the Wikipedia article "Levenshtein distance": kitten → sitting is 3.
    [InlineData("kitten", "sitting", 3)]
    // Wikipedia "Damerau–Levenshtein distance": the optimal string alignment distance of CA and ABC is 3
    // (true Damerau–Levenshtein gives 2); a single adjacent transposition costs 1.
    [InlineData("CA", "ABC", 3)]
    [InlineData("ab", "ba", 1)]
    [InlineData("", "abc", 3)]
    [InlineData("Phrases", "phrases", 0)]
    public void Between_KnownPairs_GivesPublishedDistance(string a, string b, int expected)
    {
        Assert.Equal(expected, EditDistance.Between(a, b));
        Assert.Equal(expected, EditDistance.BetweenWords(a, b));
    }

    /// <summary>
    /// The allocation-free form against the table form (differential testing, common practice) on random short words
    /// over a small alphabet (many transpositions and repeats) with upper-case and accented letters, and on word pairs
    /// of the CLINC150 validation split (Larson et al., 2019), long ones included (past the stack table).
    /// </summary>
    [Fact]
    public void BetweenWords_RandomAndCorpusWords_EqualsBetween()
    {
        var random = new Random(3);
        const string alphabet = "abcAB\u00E9\u00C9'";
        for (int trial = 0; trial < 20_000; trial++)
        {
            string a = Word(random.Next(0, 9)), b = Word(random.Next(0, 9));
            Assert.Equal(EditDistance.Between(a, b), EditDistance.BetweenWords(a, b));
        }
        var words = Clinc150.Split("val").SelectMany(r => TaskPhrase.Text.WordStemmer.Words(r.Text)).Distinct().Take(300).ToArray();
        for (int i = 0; i + 1 < words.Length; i++)
            Assert.Equal(EditDistance.Between(words[i], words[i + 1]), EditDistance.BetweenWords(words[i], words[i + 1]));
        string longA = string.Concat(words.Take(60)), longB = string.Concat(words.Skip(1).Take(60));
        Assert.True(longB.Length > 256);
        Assert.Equal(EditDistance.Between(longA, longB), EditDistance.BetweenWords(longA, longB));

        string Word(int length)
        {
            var chars = new char[length];
            for (int k = 0; k < length; k++) chars[k] = alphabet[random.Next(alphabet.Length)];
            return new string(chars);
        }
    }

    [Theory]
    [InlineData("phrase", "phrases")]
    [InlineData("must-reject", "must_reject")]
    [InlineData("acept", "accept")]
    [InlineData("confrim", "confirm")]
    public void Suggest_TypoOfATaskKey_GivesTheKey(string typo, string expected)
        => Assert.Equal(expected, EditDistance.Suggest(typo, RegistryValidator.TaskKeys));

    [Fact]
    public void Suggest_TypoOfAControllerKey_GivesTheKey()
        => Assert.Equal("latent_dims", EditDistance.Suggest("latentdims", RegistryValidator.ControllerKeys));

    [Fact]
    public void Suggest_UnrelatedWord_GivesNull()
        => Assert.Null(EditDistance.Suggest("colour", RegistryValidator.TaskKeys));
}
