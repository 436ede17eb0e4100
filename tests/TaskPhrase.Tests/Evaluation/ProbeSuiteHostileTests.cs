using TaskPhrase.Evaluation;

namespace TaskPhrase.Tests.Evaluation;

/// <summary>Regressions for hostile probe suites found by the reliability work (property tests and fuzzing).</summary>
public class ProbeSuiteHostileTests
{
    [Fact]
    public void Load_NoncharacterFFFE_IsReadAndComparedAfterNormalisation()
    {
        // Before the fix, TextNormalizer.MatchKey threw ArgumentException (from .NET's ICU NFKC) on U+FFFE, so this
        // suite crashed the reader instead of getting its one documented error.
        string path = TestPaths.Data("probes", "noncharacter-fffe.csv");

        var ex = Assert.Throws<ProbeSuiteException>(() => ProbeSuite.Load(path));

        var error = Assert.Single(ex.Errors);
        Assert.Equal(3, error.Line);
        Assert.Contains("the same utterance is on line 2 with expect 'water-basil', here with 'reject'", error.Message, StringComparison.Ordinal);
    }
}
