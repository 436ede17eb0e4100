using TaskPhrase.Conditioning;

namespace TaskPhrase.Tests.Conditioning;

public class FilmGeneratorTests
{
    private static readonly float[] E = [1, 2, -1, 0.5f];

    [Fact]
    public void Compute_HandComputedCase_MatchesArithmetic()
    {
        // FiLM (Perez et al., 2018, "FiLM: Visual Reasoning with a General Conditioning Layer", AAAI):
        // γ = W_γ e + b_γ, β = W_β e + b_β. Fixture numbers from make_fixtures.py, e = [1, 2, −1, 0.5]
        // (so Σe = 2.5). All values are dyadic, so float32 arithmetic is exact.
        // Layer 0:
        //   γ0 = [0.5·1 + 1,  0.25·2 + 1·0.5 + 0,  (1 + 2 − 1 + 0.5) − 0.5] = [1.5, 1, 2]
        //   β0 = [1·1 − 1·2 + 0,  2·(−1) + 0.5,  4·0.5 − 1]            = [−1, −1.5, 1]
        // Layer 1:
        //   γ1 = [2·0.5 + 0.5,  −1·1 + 0.5·(−1) + 1,  0.125·1 + 0.125·2 + 0] = [1.5, −0.5, 0.375]
        //   β1 = [0.5·2.5 − 0.25,  −2·2 + 0,  1·1 − 1·0.5 + 2]          = [1, −4, 2.5]
        var generator = FilmGenerator.Load(Fixtures.Path("film-2layer-d3-e4.safetensors"), 4);

        var conditioning = generator.Compute(E);

        Assert.Equal([1.5f, 1f, 2f], conditioning.Layers[0].Gamma.ToArray());
        Assert.Equal([-1f, -1.5f, 1f], conditioning.Layers[0].Beta.ToArray());
        Assert.Equal([1.5f, -0.5f, 0.375f], conditioning.Layers[1].Gamma.ToArray());
        Assert.Equal([1f, -4f, 2.5f], conditioning.Layers[1].Beta.ToArray());
    }

    [Fact]
    public void Compute_ResidualMetadata_AddsExactlyOneToGamma()
    {
        // "gamma": "residual" means γ = 1 + W_γ e + b_γ (design, Conditioning (FiLM)); β is unchanged.
        // With the hand-computed case above: γ0 = [2.5, 2, 3], γ1 = [2.5, 0.5, 1.375].
        var plain = FilmGenerator.Load(Fixtures.Path("film-2layer-d3-e4.safetensors"), 4);
        var residual = FilmGenerator.Load(Fixtures.Path("film-2layer-d3-e4-residual.safetensors"), 4);

        var a = plain.Compute(E);
        var b = residual.Compute(E);

        Assert.False(plain.Residual);
        Assert.True(residual.Residual);
        Assert.Equal([2.5f, 2f, 3f], b.Layers[0].Gamma.ToArray());
        Assert.Equal([2.5f, 0.5f, 1.375f], b.Layers[1].Gamma.ToArray());
        for (var l = 0; l < 2; l++)
        {
            Assert.Equal(a.Layers[l].Gamma.ToArray().Select(g => g + 1f), b.Layers[l].Gamma.ToArray());
            Assert.Equal(a.Layers[l].Beta.ToArray(), b.Layers[l].Beta.ToArray());
        }
    }

    [Theory]
    [InlineData(false)]
    [InlineData(true)]
    public void Apply_IdentityParameters_LeaveHiddenUnchanged(bool residual)
    {
        // Perez et al. (2018): with γ = 1 and β = 0, FiLM(h) = γ ⊙ h + β = h. The generator reaches the
        // identity with W = 0 and b_γ = 1 (or b_γ = 0 in the residual form), b_β = 0.
        var bytes = GeneratorBytes(e: 5, residual, (4, 0f, residual ? 0f : 1f, 0f, 0f), (2, 0f, residual ? 0f : 1f, 0f, 0f));
        var generator = FilmGenerator.FromBytes(bytes, "identity", 5);
        float[] hidden = [0.3f, -7.25f, 1e-20f, 123456.7f];
        var original = hidden.ToArray();

        var conditioning = generator.Compute([0.9f, -0.1f, 0.2f, 0.3f, -0.4f]);
        FilmGenerator.Apply(hidden, conditioning.Layers[0].Gamma.Span, conditioning.Layers[0].Beta.Span);

        Assert.Equal(FilmConditioning.Identity(4, 2), conditioning);
        Assert.Equal(original, hidden);
    }

    [Fact]
    public void Apply_HandComputedCase_IsGammaTimesHPlusBeta()
    {
        // γ ⊙ h + β with h = [2, −1, 0.5], γ = [1.5, 1, 2], β = [−1, −1.5, 1]:
        // [1.5·2 − 1, 1·(−1) − 1.5, 2·0.5 + 1] = [2, −2.5, 2].
        float[] hidden = [2, -1, 0.5f];

        FilmGenerator.Apply(hidden, [1.5f, 1, 2], [-1, -1.5f, 1]);

        Assert.Equal([2f, -2.5f, 2f], hidden);
    }

    [Fact]
    public void Apply_LengthsDiffer_IsRefused()
        => Assert.Contains("all three must have the layer's width", Assert.Throws<ArgumentException>(() => FilmGenerator.Apply(new float[3], new float[3], new float[2])).Message);

    [Fact]
    public void Compute_RandomWeights_MatchesDoublePrecisionOracle()
    {
        // Oracle: a plain double-precision loop over the same numbers; float32 dot products of 384 terms
        // of size ≤ 0.05 agree with it to well within 1e-5 (common practice for float32 accumulation).
        var random = new Random(7);
        const int e = 384;
        int[] widths = [16, 8, 5];
        var writer = new SafeTensorsWriter();
        var weights = new Dictionary<string, float[]>();
        for (var l = 0; l < widths.Length; l++)
        {
            foreach (var part in new[] { "gamma", "beta" })
            {
                weights[$"film.{l}.{part}.weight"] = Values(random, widths[l] * e, 0.05f);
                weights[$"film.{l}.{part}.bias"] = Values(random, widths[l], 0.5f);
                writer.AddFloat32($"film.{l}.{part}.weight", weights[$"film.{l}.{part}.weight"], widths[l], e);
                writer.AddFloat32($"film.{l}.{part}.bias", weights[$"film.{l}.{part}.bias"], widths[l]);
            }
        }

        var generator = FilmGenerator.FromBytes(writer.ToArray(), "random", e);
        var embedding = Values(random, e, 0.1f);

        var conditioning = generator.Compute(embedding);

        Assert.Equal(widths, generator.LayerWidths);
        for (var l = 0; l < widths.Length; l++)
        {
            for (var i = 0; i < widths[l]; i++)
            {
                Assert.Equal(Oracle(weights[$"film.{l}.gamma.weight"], weights[$"film.{l}.gamma.bias"], embedding, i), conditioning.Layers[l].Gamma.Span[i], 1e-5);
                Assert.Equal(Oracle(weights[$"film.{l}.beta.weight"], weights[$"film.{l}.beta.bias"], embedding, i), conditioning.Layers[l].Beta.Span[i], 1e-5);
            }
        }
    }

    [Fact]
    public void Compute_SpanOverload_EqualsAllocatingOverload()
    {
        var generator = FilmGenerator.Load(Fixtures.Path("film-2layer-d3-e4-residual.safetensors"), 4);
        var expected = generator.Compute(E);
        Span<float> gamma = stackalloc float[3];
        Span<float> beta = stackalloc float[3];

        generator.Compute(E, 1, gamma, beta);

        Assert.Equal(expected.Layers[1].Gamma.ToArray(), gamma.ToArray());
        Assert.Equal(expected.Layers[1].Beta.ToArray(), beta.ToArray());
    }

    [Fact]
    public void Load_ReferenceFile_ExposesShapeFactsAndFileHash()
    {
        // The hash is checked against Python's hashlib (SHA256SUMS written by make_fixtures.py).
        var generator = FilmGenerator.Load(Fixtures.Path("film-2layer-d3-e4.safetensors"), 4);

        Assert.Equal(2, generator.LayerCount);
        Assert.Equal([3, 3], generator.LayerWidths);
        Assert.Equal(4, generator.EmbeddingDimensions);
        Assert.Equal(Fixtures.ReferenceSha256("film-2layer-d3-e4.safetensors"), generator.Sha256);
        Assert.NotEqual(generator.Sha256, FilmGenerator.Load(Fixtures.Path("film-2layer-d3-e4-residual.safetensors"), 4).Sha256);
    }

    [Fact]
    public void Load_EmbeddingWidthDiffers_NamesTensorAndShapes()
    {
        var path = Fixtures.Path("film-2layer-d3-e4.safetensors");

        var error = Assert.Throws<SafeTensorsException>(() => FilmGenerator.Load(path, 384));

        Assert.Equal($"{path}: tensor 'film.0.gamma.weight': shape is [3, 4]; expected [3, 384] (d = the decoder layer's width, at least 1; 384 = the embedding width).", error.Message);
    }

    [Theory]
    [InlineData("film-missing-beta-bias.safetensors", "film.1.beta.bias", "the tensor is missing; every FiLM layer needs film.1.gamma.weight, film.1.gamma.bias, film.1.beta.weight, film.1.beta.bias.")]
    [InlineData("film-layer-gap.safetensors", null, "FiLM layer 1 is missing (found layers 0, 2); layers must be numbered 0, 1, 2, … without gaps.")]
    [InlineData("film-gamma-bias-wrong-shape.safetensors", "film.0.gamma.bias", "shape is [2]; expected [3] to match film.0.gamma.weight (d = 3).")]
    [InlineData("film-weight-embedding-width-5.safetensors", "film.0.gamma.weight", "shape is [3, 5]; expected [3, 4] (d = the decoder layer's width, at least 1; 4 = the embedding width).")]
    [InlineData("film-f16-weights.safetensors", "film.0.gamma.weight", "dtype is F16; FiLM generator tensors must be F32. Convert them when exporting.")]
    [InlineData("film-unknown-gamma-metadata.safetensors", null, "metadata 'gamma' is 'Residual'; the only value understood is 'residual' (γ = 1 + W_γ e + b_γ). Remove the key for γ = W_γ e + b_γ.")]
    [InlineData("film-misspelt-tensor-name.safetensors", "film.0.gamma.weights", "not a FiLM generator tensor name; under 'film.' only film.<layer>.gamma.weight, film.<layer>.gamma.bias, film.<layer>.beta.weight and film.<layer>.beta.bias are allowed, with layers numbered 0, 1, 2, … without leading zeros. Rename or remove the tensor.")]
    [InlineData("film-no-film-tensors.safetensors", null, "no FiLM generator tensors; expected film.0.gamma.weight [d, 4], film.0.gamma.bias [d], film.0.beta.weight [d, 4] and film.0.beta.bias [d], and so on for further layers.")]
    [InlineData("film-nan-weight.safetensors", "film.1.beta.weight", "element 2 is NaN; FiLM generator weights must be finite.")]
    [InlineData("truncated-data.safetensors", "film.1.gamma.weight", "data_offsets [192, 240] reach past the end of the byte buffer, which holds 228 bytes (header line 1, column 581); the file is truncated or the header is wrong.")]
    public void Load_InvalidGeneratorFile_IsRefusedWithTheDefect(string fixture, string? tensor, string expected)
    {
        // Well-formed safetensors files (written by make_fixtures.py) that break the generator contract of the
        // design (Conditioning (FiLM)): F32 tensors film.<layer>.{gamma,beta}.{weight,bias}, [d, E] and [d],
        // layers numbered from 0.
        var path = Fixtures.Path(fixture);

        var error = Assert.Throws<SafeTensorsException>(() => FilmGenerator.Load(path, 4));

        Assert.Equal(tensor is null ? $"{path}: {expected}" : $"{path}: tensor '{tensor}': {expected}", error.Message);
    }

    [Fact]
    public void FromBytes_OtherTensorsBesideFilm_AreIgnored()
    {
        var writer = new SafeTensorsWriter()
            .AddFloat32("decoder.0.weight", [1, 2, 3, 4], 2, 2)
            .AddFloat32("filmstrip", [9], 1);
        var bytes = GeneratorBytes(e: 2, residual: false, (1, 0.5f, 0.25f, -1f, 0f));
        using (var file = SafeTensorsFile.FromBytes(bytes, "film only"))
        {
            foreach (var tensor in file.Tensors)
            {
                writer.AddFloat32(tensor.Name, file.ReadFloats(tensor.Name), [.. tensor.Shape]);
            }
        }

        var generator = FilmGenerator.FromBytes(writer.ToArray(), "mixed", 2);

        // γ = 0.5·(2 + 4) + 0.25 = 3.25; β = −1·(2 + 4) + 0 = −6.
        var conditioning = generator.Compute([2, 4]);
        Assert.Equal([3.25f], conditioning.Layers[0].Gamma.ToArray());
        Assert.Equal([-6f], conditioning.Layers[0].Beta.ToArray());
    }

    [Fact]
    public void Compute_EmbeddingOfWrongWidthOrNotFinite_IsRefused()
    {
        var generator = FilmGenerator.Load(Fixtures.Path("film-2layer-d3-e4.safetensors"), 4);

        Assert.Contains("has 3 dimensions", Assert.Throws<ArgumentException>(() => generator.Compute([1, 2, 3])).Message);
        Assert.Contains("Embedding element 1 is NaN", Assert.Throws<ArgumentException>(() => generator.Compute([1, float.NaN, 3, 4])).Message);
    }

    [Fact]
    public void Compute_ManyThreads_GiveIdenticalResults()
    {
        var generator = FilmGenerator.Load(Fixtures.Path("film-2layer-d3-e4.safetensors"), 4);
        var expected = generator.Compute(E);

        Parallel.For(0, 1000, _ => Assert.Equal(expected, generator.Compute(E)));
    }

    /// <summary>A generator file whose every weight of a part has one value: (d, wγ, bγ, wβ, bβ) per layer.</summary>
    internal static byte[] GeneratorBytes(int e, bool residual, params (int D, float GammaWeight, float GammaBias, float BetaWeight, float BetaBias)[] layers)
    {
        var writer = new SafeTensorsWriter();
        for (var l = 0; l < layers.Length; l++)
        {
            var (d, gw, gb, bw, bb) = layers[l];
            writer.AddFloat32($"film.{l}.gamma.weight", Filled(d * e, gw), d, e)
                .AddFloat32($"film.{l}.gamma.bias", Filled(d, gb), d)
                .AddFloat32($"film.{l}.beta.weight", Filled(d * e, bw), d, e)
                .AddFloat32($"film.{l}.beta.bias", Filled(d, bb), d);
        }

        if (residual)
        {
            writer.SetMetadata(FilmGenerator.GammaMetadataKey, FilmGenerator.ResidualGammaValue);
        }

        return writer.ToArray();
    }

    private static float[] Filled(int count, float value) => Enumerable.Repeat(value, count).ToArray();

    private static float[] Values(Random random, int count, float scale)
        => Enumerable.Range(0, count).Select(_ => (float)((random.NextDouble() * 2) - 1) * scale).ToArray();

    private static double Oracle(float[] weight, float[] bias, float[] embedding, int row)
    {
        double sum = bias[row];
        for (var j = 0; j < embedding.Length; j++)
        {
            sum += (double)weight[(row * embedding.Length) + j] * embedding[j];
        }

        return sum;
    }
}
