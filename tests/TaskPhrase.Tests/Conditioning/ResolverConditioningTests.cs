using TaskPhrase.Conditioning;
using TaskPhrase.Registry;
using TaskPhrase.Resolution;

namespace TaskPhrase.Tests.Conditioning;

/// <summary>
/// FiLM through the resolver: γ = W_γ e + b_γ (residual form: 1 + …) and β = W_β e + b_β, with e the embedding of the
/// matched *approved* phrase (Perez et al., 2018, "FiLM: Visual Reasoning with a General Conditioning Layer"; the
/// expected values are computed here in double precision, independently of FilmGenerator).
/// </summary>
[Collection(ModelCollection.Name)]
public class ResolverConditioningTests(ModelFixture fixture)
{
    [Theory]
    [InlineData(false)]
    [InlineData(true)]
    public void Resolve_WithFilm_ConditioningIsAffineMapOfMatchedPhraseEmbedding(bool residual)
    {
        const int d = 5, e = 384;
        var rng = new Random(20261201);
        float[] Random(int n) => Enumerable.Range(0, n).Select(_ => (float)(rng.NextDouble() - 0.5)).ToArray();
        float[] wg = Random(d * e), bg = Random(d), wb = Random(d * e), bb = Random(d);
        var writer = new SafeTensorsWriter()
            .AddFloat32("film.0.gamma.weight", wg, d, e).AddFloat32("film.0.gamma.bias", bg, d)
            .AddFloat32("film.0.beta.weight", wb, d, e).AddFloat32("film.0.beta.bias", bb, d);
        if (residual) writer.SetMetadata("gamma", "residual");
        var generator = FilmGenerator.FromBytes(writer.ToArray(), "test.safetensors", e);

        var registry = new TaskRegistry(
        [
            new TaskDefinition { Id = "water-basil", Title = "Water the basil", Controller = new ControllerBinding("pour-arc.v2", 2), Phrases = ["water the basil", "give the basil plant a drink"] },
            new TaskDefinition { Id = "hall-light", Title = "Press the hall light switch", Controller = new ControllerBinding("reach-press.v1", 1), Phrases = ["turn on the hall light"] },
        ], new RegistryDefaults(0.4f, 0.02f), "film-test");
        var resolver = TaskResolver.Create(registry, fixture.Embedder);
        resolver.UseConditioning(generator);

        var r = resolver.Resolve("could you water my basil please");
        Assert.Equal(ResolutionOutcome.Accepted, r.Outcome);
        var phraseEmbedding = new float[e];
        fixture.Embedder.Embed(r.Phrase!, phraseEmbedding);       // the approved phrase, not the utterance
        var layer = Assert.Single(r.Conditioning!.Layers);
        for (int i = 0; i < d; i++)
        {
            double g = bg[i] + (residual ? 1 : 0), b = bb[i];
            for (int j = 0; j < e; j++) { g += (double)wg[i * e + j] * phraseEmbedding[j]; b += (double)wb[i * e + j] * phraseEmbedding[j]; }
            Assert.Equal(g, layer.Gamma.Span[i], 1e-4);
            Assert.Equal(b, layer.Beta.Span[i], 1e-4);
        }
        Assert.Null(resolver.Resolve("what is the capital of peru").Conditioning);
    }
}
