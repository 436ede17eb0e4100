using System.Globalization;
using System.Text.Json;
using TaskPhrase.Conditioning;

namespace FilmDecoderDemo;

/// <summary>
/// Writes INVENTED demo weights for the water-basil decoder and its FiLM generator, from a fixed seed.
/// They are random numbers with the right shapes, not a trained controller.
/// </summary>
internal static class DemoWeights
{
    public const ulong Seed = 0x7A5C_0B45_11F0_2024;
    public const string DecoderFile = "pour-arc.v2.decoder.safetensors";
    public const string FilmFile = "pour-arc.v2.film.safetensors";
    public const string EmbeddingFile = "demo-embedding.json";
    public const int EmbeddingDimensions = 384;

    public static void Write(string directory)
    {
        Directory.CreateDirectory(directory);
        var random = new SplitMix64(Seed);
        var h = LatentActionDecoder.HiddenUnits;
        var j = LatentActionDecoder.Joints;
        var l = LatentActionDecoder.LatentDims;

        // Xavier/Glorot uniform initialisation, a = sqrt(6 / (fan_in + fan_out)) (common practice).
        new SafeTensorsWriter()
            .AddFloat32(LatentActionDecoder.HiddenWeight, random.Uniform(h * l, MathF.Sqrt(6f / (l + h))), h, l)
            .AddFloat32(LatentActionDecoder.HiddenBias, random.Uniform(h, 0.05f), h)
            .AddFloat32(LatentActionDecoder.OutputWeight, random.Uniform(j * h, 0.5f * MathF.Sqrt(6f / (h + j))), j, h)
            .AddFloat32(LatentActionDecoder.OutputBias, random.Uniform(j, 0.05f), j)
            .SetMetadata("task", "water-basil")
            .SetMetadata("manifold", "pour-arc.v2")
            .SetMetadata("latent_dims", l.ToString(CultureInfo.InvariantCulture))
            .SetMetadata("demo", $"INVENTED weights from seed 0x{Seed:X}; not a trained controller")
            .Save(Path.Combine(directory, DecoderFile));

        // One FiLM layer for the decoder's hidden layer, residual γ = 1 + W_γ e + b_γ.
        var e = EmbeddingDimensions;
        new SafeTensorsWriter()
            .AddFloat32("film.0.gamma.weight", random.Uniform(h * e, 0.4f), h, e)
            .AddFloat32("film.0.gamma.bias", random.Uniform(h, 0.05f), h)
            .AddFloat32("film.0.beta.weight", random.Uniform(h * e, 0.4f), h, e)
            .AddFloat32("film.0.beta.bias", random.Uniform(h, 0.05f), h)
            .SetMetadata(FilmGenerator.GammaMetadataKey, FilmGenerator.ResidualGammaValue)
            .SetMetadata("demo", $"INVENTED weights from seed 0x{Seed:X}; not trained")
            .Save(Path.Combine(directory, FilmFile));

        // A random unit vector standing in for a phrase embedding, so the demo runs without the model.
        var vector = random.Uniform(e, 1f);
        var norm = MathF.Sqrt(vector.Sum(v => v * v));
        File.WriteAllText(Path.Combine(directory, EmbeddingFile), JsonSerializer.Serialize(vector.Select(v => v / norm)));
    }

    /// <summary>SplitMix64 (Steele, Lea and Flood, 2014): tiny, deterministic on every platform and .NET version.</summary>
    private sealed class SplitMix64(ulong state)
    {
        public float[] Uniform(int count, float bound)
        {
            var values = new float[count];
            for (var i = 0; i < count; i++)
            {
                values[i] = (float)((NextDouble() * 2) - 1) * bound;
            }

            return values;
        }

        private double NextDouble()
        {
            state += 0x9E3779B97F4A7C15;
            var z = state;
            z = (z ^ (z >> 30)) * 0xBF58476D1CE4E5B9;
            z = (z ^ (z >> 27)) * 0x94D049BB133111EB;
            z ^= z >> 31;
            return (z >> 11) * (1.0 / (1UL << 53));
        }
    }
}
