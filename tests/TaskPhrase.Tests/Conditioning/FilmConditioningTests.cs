using System.Text.Json;
using TaskPhrase.Conditioning;

namespace TaskPhrase.Tests.Conditioning;

public class FilmConditioningTests
{
    [Fact]
    public void FilmLayer_SourceArraysChangedAfterwards_LayerKeepsItsValues()
    {
        float[] gamma = [1, 2];
        float[] beta = [3, 4];
        var layer = new FilmLayer(gamma, beta);

        gamma[0] = 99;
        beta[1] = 99;

        Assert.Equal([1f, 2f], layer.Gamma.ToArray());
        Assert.Equal([3f, 4f], layer.Beta.ToArray());
    }

    [Theory]
    [InlineData(new float[0], new float[0], "γ must have at least one element.")]
    [InlineData(new float[] { 1, 2 }, new float[] { 0 }, "β has 1 elements but γ has 2")]
    [InlineData(new float[] { 1, float.NaN }, new float[] { 0, 0 }, "γ[1] is NaN; FiLM parameters must be finite.")]
    [InlineData(new float[] { 1 }, new float[] { float.PositiveInfinity }, "β[0] is Infinity; FiLM parameters must be finite.")]
    public void FilmLayer_InvalidVectors_AreRefused(float[] gamma, float[] beta, string expected)
        => Assert.Contains(expected, Assert.Throws<ArgumentException>(() => new FilmLayer(gamma, beta)).Message);

    [Fact]
    public void Equals_SameValues_AreEqualWithSameHash()
    {
        var a = new FilmConditioning([new FilmLayer([1.5f, -0.5f], [0, 2]), new FilmLayer([1], [0.25f])]);
        var b = new FilmConditioning([new FilmLayer([1.5f, -0.5f], [0, 2]), new FilmLayer([1], [0.25f])]);

        Assert.Equal(a, b);
        Assert.Equal(a.GetHashCode(), b.GetHashCode());
        Assert.True(a.Equals((object)b));
    }

    [Fact]
    public void Equals_OneValueDiffers_AreNotEqualButApproximatelyEqual()
    {
        var a = new FilmConditioning([new FilmLayer([1.5f, -0.5f], [0, 2])]);
        var b = new FilmConditioning([new FilmLayer([1.5f, -0.5f], [0, 2.00001f])]);

        Assert.NotEqual(a, b);
        Assert.True(a.IsApproximately(b, 1e-4f));
        Assert.False(a.IsApproximately(b, 1e-6f));
        Assert.False(a.IsApproximately(FilmConditioning.Identity(2, 1), 10f));
    }

    [Fact]
    public void Identity_Widths_AreOnesAndZeros()
    {
        var identity = FilmConditioning.Identity(3, 1);

        Assert.Equal([3, 1], identity.LayerWidths);
        Assert.Equal([1f, 1f, 1f], identity.Layers[0].Gamma.ToArray());
        Assert.Equal([0f, 0f, 0f], identity.Layers[0].Beta.ToArray());
    }

    [Fact]
    public void ToJson_SmallCase_HasTheDocumentedForm()
    {
        var conditioning = new FilmConditioning([new FilmLayer([1.5f, 1, 2], [-1, -1.5f, 1]), new FilmLayer([0.1f], [-3e-7f])]);

        Assert.Equal("{\"layers\":[{\"gamma\":[1.5,1,2],\"beta\":[-1,-1.5,1]},{\"gamma\":[0.1],\"beta\":[-3E-07]}]}", conditioning.ToJson());
    }

    [Fact]
    public void FromJson_OwnOutput_RoundTripsExactly()
    {
        var random = new Random(3);
        var layers = Enumerable.Range(1, 3).Select(w => new FilmLayer(
            Enumerable.Range(0, w * 5).Select(_ => (float)random.NextDouble() * 4 - 2).ToArray(),
            Enumerable.Range(0, w * 5).Select(_ => (float)random.NextDouble() / 3).ToArray()));
        var conditioning = new FilmConditioning(layers);

        Assert.Equal(conditioning, FilmConditioning.FromJson(conditioning.ToJson()));
    }

    [Fact]
    public void FromJson_ElementOfLargerDocument_IsRead()
    {
        using var document = JsonDocument.Parse("{\"outcome\":\"accepted\",\"conditioning\":{\"layers\":[{\"gamma\":[1,2],\"beta\":[0.5,0]}]}}");

        var conditioning = FilmConditioning.FromJson(document.RootElement.GetProperty("conditioning"));

        Assert.Equal(new FilmConditioning([new FilmLayer([1, 2], [0.5f, 0])]), conditioning);
    }

    [Theory]
    [InlineData("{\"layers\":[{\"gamma\":[1,2],\"beta\":[0]}]}", "test: layers[0] has 2 gamma and 1 beta values")]
    [InlineData("{\"layers\":[{\"gamma\":[1]}]}", "test: layers[0].beta is missing or not an array of numbers.")]
    [InlineData("{\"layers\":[{\"gamma\":[1,\"x\"],\"beta\":[0,0]}]}", "test: layers[0].gamma[1] is \"x\", not a finite number.")]
    [InlineData("{\"layers\":[]}", "test: \"layers\" is empty")]
    [InlineData("[1,2]", "test: expected an object {\"layers\"")]
    [InlineData("{\"layers\":[{\"gamma\":[1],\"beta\":[1e39]}]}", "test: layers[0].beta[0] is 1e39, not a finite number.")]
    [InlineData("{\"layers\":\n[{\"gamma\":[1],}]}", "test: not valid JSON at line 2, column")]
    public void FromJson_Malformed_IsRefusedSayingWhere(string json, string expected)
        => Assert.StartsWith(expected, Assert.Throws<FormatException>(() => FilmConditioning.FromJson(json, "test")).Message);
}
