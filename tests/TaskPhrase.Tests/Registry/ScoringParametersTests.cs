using TaskPhrase.Registry;

namespace TaskPhrase.Tests.Registry;

/// <summary>The mapping form of the registry's <c>scoring</c> key (strategy plus its parameters, as <c>tune</c> writes it).</summary>
public class ScoringParametersTests
{
    private const string Tasks = """
        tasks:
          - id: hall-light
            title: Press the hall light switch
            controller: { manifold: reach-press.v1, latent_dims: 1 }
            phrases: [turn on the hall light, press the hall light switch]
        """;

    private static RegistryLoadResult Parse(string scoring) => RegistryLoader.TryParse("version: 1\n" + scoring + "\n" + Tasks, "test.yaml");

    [Fact]
    public void Parse_MappingForm_ReadsStrategyAndParameters()
    {
        var r = Parse("scoring:\n  strategy: head\n  shrinkage: 0.5\n  l2: 0.01\n  temperature: 2\n  probability_weight: 0.75");
        Assert.True(r.Registry is not null, string.Join("; ", r.Diagnostics));
        Assert.Equal("head", r.Registry!.Settings.Scoring);
        Assert.Equal(new ScoringParameters { Shrinkage = 0.5, L2 = 0.01, Temperature = 2, ProbabilityWeight = 0.75 }, r.Registry.Settings.ScoringParameters);
    }

    [Fact]
    public void Parse_MappingWithStrategyOnly_EqualsThePlainForm()
    {
        var mapping = Parse("scoring:\n  strategy: whitened").Registry!;
        var plain = Parse("scoring: whitened").Registry!;
        Assert.Null(mapping.Settings.ScoringParameters);
        Assert.Equal(plain.ContentHash, mapping.ContentHash);
    }

    [Fact]
    public void Hash_DependsOnTheParameters()
    {
        var a = Parse("scoring: {strategy: head, l2: 0.01}").Registry!;
        var b = Parse("scoring: {strategy: head, l2: 0.1}").Registry!;
        var plain = Parse("scoring: head").Registry!;
        Assert.NotEqual(a.ContentHash, b.ContentHash);
        Assert.NotEqual(a.ContentHash, plain.ContentHash);
    }

    [Fact]
    public void CanonicalForm_RoundTripsTheParameters()
    {
        var registry = Parse("scoring: {strategy: head, shrinkage: 0.25, temperature: 4}").Registry!;
        var again = RegistryCanonicalForm.FromJson(RegistryCanonicalForm.ToJson(registry));
        Assert.Equal(registry.Settings, again.Settings);
        Assert.Equal(registry.ContentHash, again.ContentHash);
        Assert.Contains("\"scoring\":{\"strategy\":\"head\",\"shrinkage\":0.25,\"temperature\":4}", RegistryCanonicalForm.ToJson(registry));
    }

    [Theory]
    [InlineData("scoring: {strategy: centroid, l2: 0.01}", "applies to the strategy head only")]
    [InlineData("scoring: {strategy: best-phrase, shrinkage: 0.5}", "whitened and head only")]
    [InlineData("scoring: {strategy: head, l2: 0}", "out of range")]
    [InlineData("scoring: {strategy: head, temperature: 500}", "out of range")]
    [InlineData("scoring: {strategy: whitened, shrinkage: 1.5}", "out of range")]
    [InlineData("scoring: {strategy: head, temprature: 2}", "did you mean 'temperature'")]
    [InlineData("scoring: {l2: 0.01}", "has no 'strategy'")]
    [InlineData("scoring: {strategy: heads}", "did you mean 'head'")]
    [InlineData("scoring: {strategy: head, l2: lots}", "must be a number")]
    [InlineData("scoring: {strategy: centroid, probability_weight: 0.7}", "applies to the strategy head only")]
    [InlineData("scoring: {strategy: head, probability_weight: 1.5}", "out of range")]
    [InlineData("scoring: {strategy: centroid, k: 2}", "applies to the strategy top-k only")]
    [InlineData("scoring: {strategy: top-k, k: 2.5}", "must be a whole number")]
    [InlineData("scoring: {strategy: top-k, k: 0}", "out of range")]
    [InlineData("scoring: {strategy: top-k, k: 51}", "out of range")]
    [InlineData("scoring: {strategy: head, centroid_weight: 0.3}", "applies to the strategy blend only")]
    [InlineData("scoring: {strategy: blend, centroid_weight: -0.1}", "out of range")]
    public void Parse_BadMapping_SaysWhatIsWrong(string scoring, string expected)
    {
        var r = Parse(scoring);
        Assert.Null(r.Registry);
        Assert.Contains(r.Diagnostics, d => d.Message.Contains(expected, StringComparison.Ordinal));
        Assert.All(r.Diagnostics, d => Assert.Equal(2, d.Line));
    }

    [Fact]
    public void Parse_TopKAndBlendParameters_AreReadAndCountInTheHash()
    {
        var topK = Parse("scoring: {strategy: top-k, k: 5}").Registry!;
        Assert.Equal(5, topK.Settings.ScoringParameters!.K);
        var blend = Parse("scoring: {strategy: blend, centroid_weight: 0.25}").Registry!;
        Assert.Equal(0.25, blend.Settings.ScoringParameters!.CentroidWeight);
        Assert.NotEqual(Parse("scoring: top-k").Registry!.ContentHash, topK.ContentHash);
        Assert.NotEqual(Parse("scoring: blend").Registry!.ContentHash, blend.ContentHash);
        Assert.Equal("k 5", topK.Settings.ScoringParameters.ToString());
    }
}
