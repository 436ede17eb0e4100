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
        => Assert.Equal(expected, EditDistance.Between(a, b));

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
