using System.Globalization;
using System.Numerics.Tensors;
using System.Security.Cryptography;
using System.Text.RegularExpressions;

namespace TaskPhrase.Conditioning;

/// <summary>
/// The FiLM generator of a downstream decoder: for each decoder layer, γ = W_γ e + b_γ and β = W_β e + b_β
/// computed from a phrase embedding e (Perez et al., 2018, "FiLM: Visual Reasoning with a General
/// Conditioning Layer"). With the header metadata <c>"gamma": "residual"</c>, γ = 1 + W_γ e + b_γ.
/// The weights come from a safetensors file with F32 tensors <c>film.&lt;layer&gt;.gamma.weight</c> [d, E],
/// <c>film.&lt;layer&gt;.gamma.bias</c> [d], <c>film.&lt;layer&gt;.beta.weight</c> [d, E] and
/// <c>film.&lt;layer&gt;.beta.bias</c> [d], layers numbered from 0 without gaps; other tensors (not starting
/// with <c>film.</c>) are ignored, so decoder weights may share the file.
/// </summary>
/// <remarks>Immutable and thread-safe: load once, share across threads.</remarks>
public sealed partial class FilmGenerator
{
    /// <summary>The largest generator file accepted (256 MiB); it is read whole so that <see cref="Sha256"/> identifies exactly the bytes used.</summary>
    public const long MaxFileBytes = 256L * 1024 * 1024;

    /// <summary>The metadata key that selects the γ parametrisation.</summary>
    public const string GammaMetadataKey = "gamma";

    /// <summary>The <see cref="GammaMetadataKey"/> value meaning γ = 1 + W_γ e + b_γ.</summary>
    public const string ResidualGammaValue = "residual";

    private const string Prefix = "film.";
    private static readonly string[] Parts = ["gamma.weight", "gamma.bias", "beta.weight", "beta.bias"];

    private readonly LayerWeights[] layers;

    private FilmGenerator(string sourceName, string sha256, int embeddingDimensions, bool residual, LayerWeights[] layers)
    {
        SourceName = sourceName;
        Sha256 = sha256;
        EmbeddingDimensions = embeddingDimensions;
        Residual = residual;
        this.layers = layers;
        LayerWidths = Array.AsReadOnly(layers.Select(l => l.Width).ToArray());
    }

    /// <summary>The file path, or the name given to the bytes.</summary>
    public string SourceName { get; }

    /// <summary>SHA-256 of the generator file, lower-case hex; identifies the weights in indexes and reports.</summary>
    public string Sha256 { get; }

    /// <summary>E, the embedding width the generator expects.</summary>
    public int EmbeddingDimensions { get; }

    /// <summary>True for the residual parametrisation γ = 1 + W_γ e + b_γ.</summary>
    public bool Residual { get; }

    /// <summary>Number of decoder layers conditioned.</summary>
    public int LayerCount => layers.Length;

    /// <summary>d of each layer (the length of its γ and β), layer 0 first.</summary>
    public IReadOnlyList<int> LayerWidths { get; }

    /// <summary>Loads and validates a generator file.</summary>
    /// <param name="path">The safetensors file.</param>
    /// <param name="embeddingDimensions">E, the width of the phrase embeddings (384 for the default model).</param>
    /// <returns>The generator.</returns>
    /// <exception cref="SafeTensorsException">The file is malformed, too large, or its tensors are missing, mis-shaped, not F32 or not finite; the message names the tensor and the expected vs actual shape.</exception>
    /// <exception cref="IOException">The file cannot be read.</exception>
    public static FilmGenerator Load(string path, int embeddingDimensions)
    {
        ArgumentException.ThrowIfNullOrEmpty(path);
        ArgumentOutOfRangeException.ThrowIfNegativeOrZero(embeddingDimensions);
        var length = new FileInfo(path).Length;
        if (length > MaxFileBytes)
        {
            throw new SafeTensorsException(path, null, $"the file is {length} bytes, larger than the {MaxFileBytes}-byte limit for a FiLM generator; keep decoder weights in a separate file.");
        }

        return FromBytes(File.ReadAllBytes(path), path, embeddingDimensions);
    }

    /// <summary>Validates a generator held in memory.</summary>
    /// <param name="bytes">The whole safetensors file; not retained.</param>
    /// <param name="sourceName">A name for the bytes, used in error messages.</param>
    /// <param name="embeddingDimensions">E, the width of the phrase embeddings.</param>
    /// <returns>The generator.</returns>
    /// <exception cref="SafeTensorsException">As for <see cref="Load"/>.</exception>
    public static FilmGenerator FromBytes(ReadOnlyMemory<byte> bytes, string sourceName, int embeddingDimensions)
    {
        ArgumentException.ThrowIfNullOrEmpty(sourceName);
        ArgumentOutOfRangeException.ThrowIfNegativeOrZero(embeddingDimensions);
        var sha = Convert.ToHexStringLower(SHA256.HashData(bytes.Span));
        using var file = SafeTensorsFile.FromBytes(bytes, sourceName);
        var residual = ReadResidual(file);
        var layers = ReadLayers(file, embeddingDimensions);
        return new FilmGenerator(sourceName, sha, embeddingDimensions, residual, layers);
    }

    /// <summary>Computes the conditioning for one embedding.</summary>
    /// <param name="embedding">The embedding of an approved phrase; exactly <see cref="EmbeddingDimensions"/> finite values.</param>
    /// <returns>γ and β for every layer.</returns>
    /// <exception cref="ArgumentException">Wrong length, a non-finite value, or a result that overflows.</exception>
    public FilmConditioning Compute(ReadOnlySpan<float> embedding)
    {
        CheckEmbedding(embedding);
        var result = new FilmLayer[layers.Length];
        for (var l = 0; l < layers.Length; l++)
        {
            var gamma = new float[layers[l].Width];
            var beta = new float[layers[l].Width];
            ComputeLayer(embedding, l, gamma, beta);
            result[l] = FilmLayer.Wrap(gamma, beta);
        }

        return new FilmConditioning(result);
    }

    /// <summary>Computes γ and β of one layer into caller-supplied buffers, without allocating.</summary>
    /// <param name="embedding">The embedding; exactly <see cref="EmbeddingDimensions"/> finite values.</param>
    /// <param name="layer">The layer, from 0.</param>
    /// <param name="gamma">Receives γ; exactly the layer's width.</param>
    /// <param name="beta">Receives β; exactly the layer's width.</param>
    /// <exception cref="ArgumentException">Wrong lengths, a non-finite value, or a result that overflows.</exception>
    public void Compute(ReadOnlySpan<float> embedding, int layer, Span<float> gamma, Span<float> beta)
    {
        CheckEmbedding(embedding);
        ArgumentOutOfRangeException.ThrowIfNegative(layer);
        ArgumentOutOfRangeException.ThrowIfGreaterThanOrEqual(layer, layers.Length);
        var width = layers[layer].Width;
        if (gamma.Length != width || beta.Length != width)
        {
            throw new ArgumentException($"Layer {layer} has width {width}; gamma has {gamma.Length} and beta {beta.Length} elements.");
        }

        ComputeLayer(embedding, layer, gamma, beta);
    }

    /// <summary>
    /// Applies FiLM to a hidden layer in place: h ← γ ⊙ h + β (element-wise; Perez et al., 2018).
    /// </summary>
    /// <param name="hidden">The activations h, overwritten with the result.</param>
    /// <param name="gamma">γ, as long as <paramref name="hidden"/>.</param>
    /// <param name="beta">β, as long as <paramref name="hidden"/>.</param>
    /// <exception cref="ArgumentException">The lengths differ.</exception>
    public static void Apply(Span<float> hidden, ReadOnlySpan<float> gamma, ReadOnlySpan<float> beta)
    {
        if (gamma.Length != hidden.Length || beta.Length != hidden.Length)
        {
            throw new ArgumentException($"hidden has {hidden.Length} elements, gamma {gamma.Length} and beta {beta.Length}; all three must have the layer's width.");
        }

        TensorPrimitives.MultiplyAdd(hidden, gamma, beta, hidden);
    }

    /// <inheritdoc />
    public override string ToString()
        => $"FiLM generator {SourceName} (sha256 {Sha256[..12]}…, E = {EmbeddingDimensions}, layer widths [{string.Join(", ", LayerWidths)}]{(Residual ? ", residual γ" : string.Empty)})";

    private void ComputeLayer(ReadOnlySpan<float> embedding, int layer, Span<float> gamma, Span<float> beta)
    {
        var weights = layers[layer];
        var e = EmbeddingDimensions;
        var offset = Residual ? 1f : 0f;
        for (var i = 0; i < weights.Width; i++)
        {
            gamma[i] = TensorPrimitives.Dot(weights.GammaWeight.AsSpan(i * e, e), embedding) + weights.GammaBias[i] + offset;
            beta[i] = TensorPrimitives.Dot(weights.BetaWeight.AsSpan(i * e, e), embedding) + weights.BetaBias[i];
        }

        for (var i = 0; i < weights.Width; i++)
        {
            if (!float.IsFinite(gamma[i]) || !float.IsFinite(beta[i]))
            {
                throw new ArgumentException($"The embedding gives a non-finite γ or β in layer {layer}, element {i} (overflow); embeddings are expected to be of moderate size (unit length for the default model).", nameof(embedding));
            }
        }
    }

    private void CheckEmbedding(ReadOnlySpan<float> embedding)
    {
        if (embedding.Length != EmbeddingDimensions)
        {
            throw new ArgumentException($"The embedding has {embedding.Length} dimensions; the FiLM generator {SourceName} expects {EmbeddingDimensions}.", nameof(embedding));
        }

        for (var i = 0; i < embedding.Length; i++)
        {
            if (!float.IsFinite(embedding[i]))
            {
                throw new ArgumentException($"Embedding element {i} is {embedding[i].ToString(CultureInfo.InvariantCulture)}; embeddings must be finite.", nameof(embedding));
            }
        }
    }

    private static bool ReadResidual(SafeTensorsFile file)
    {
        if (!file.Metadata.TryGetValue(GammaMetadataKey, out var value))
        {
            return false;
        }

        if (value == ResidualGammaValue)
        {
            return true;
        }

        throw new SafeTensorsException(
            file.SourceName,
            null,
            $"metadata '{GammaMetadataKey}' is '{value}'; the only value understood is '{ResidualGammaValue}' (γ = 1 + W_γ e + b_γ). Remove the key for γ = W_γ e + b_γ.");
    }

    private static LayerWeights[] ReadLayers(SafeTensorsFile file, int e)
    {
        var found = new SortedSet<int>();
        foreach (var tensor in file.Tensors)
        {
            if (!tensor.Name.StartsWith(Prefix, StringComparison.Ordinal))
            {
                continue;
            }

            var match = TensorName().Match(tensor.Name);
            if (!match.Success || !int.TryParse(match.Groups["layer"].ValueSpan, NumberStyles.None, CultureInfo.InvariantCulture, out var layer))
            {
                throw new SafeTensorsException(
                    file.SourceName,
                    tensor.Name,
                    "not a FiLM generator tensor name; under 'film.' only film.<layer>.gamma.weight, film.<layer>.gamma.bias, film.<layer>.beta.weight and film.<layer>.beta.bias "
                    + "are allowed, with layers numbered 0, 1, 2, … without leading zeros. Rename or remove the tensor.");
            }

            found.Add(layer);
        }

        if (found.Count == 0)
        {
            throw new SafeTensorsException(file.SourceName, null, $"no FiLM generator tensors; expected film.0.gamma.weight [d, {e}], film.0.gamma.bias [d], film.0.beta.weight [d, {e}] and film.0.beta.bias [d], and so on for further layers.");
        }

        var count = found.Max + 1;
        if (found.Count != count)
        {
            var missing = Enumerable.Range(0, count).First(l => !found.Contains(l));
            throw new SafeTensorsException(
                file.SourceName,
                null,
                $"FiLM layer {missing} is missing (found layers {string.Join(", ", found)}); layers must be numbered 0, 1, 2, … without gaps.");
        }

        var result = new LayerWeights[count];
        for (var l = 0; l < count; l++)
        {
            var gammaWeight = Require(file, l, "gamma.weight");
            if (gammaWeight.Shape.Count != 2 || gammaWeight.Shape[0] < 1 || gammaWeight.Shape[1] != e)
            {
                var d = gammaWeight.Shape.Count == 2 && gammaWeight.Shape[0] >= 1 ? gammaWeight.Shape[0].ToString(CultureInfo.InvariantCulture) : "d";
                throw new SafeTensorsException(
                    file.SourceName,
                    gammaWeight.Name,
                    $"shape is {gammaWeight.ShapeText}; expected [{d}, {e}] (d = the decoder layer's width, at least 1; {e} = the embedding width).");
            }

            var width = (int)Math.Min(gammaWeight.Shape[0], int.MaxValue);
            var gammaBias = Require(file, l, "gamma.bias");
            var betaWeight = Require(file, l, "beta.weight");
            var betaBias = Require(file, l, "beta.bias");
            CheckShape(file, gammaBias, [width], gammaWeight.Name);
            CheckShape(file, betaWeight, [width, e], gammaWeight.Name);
            CheckShape(file, betaBias, [width], gammaWeight.Name);
            result[l] = new LayerWeights(
                width,
                ReadFinite(file, gammaWeight),
                ReadFinite(file, gammaBias),
                ReadFinite(file, betaWeight),
                ReadFinite(file, betaBias));
        }

        return result;
    }

    private static SafeTensorInfo Require(SafeTensorsFile file, int layer, string part)
    {
        var name = $"{Prefix}{layer}.{part}";
        if (!file.TryGetTensor(name, out var tensor))
        {
            throw new SafeTensorsException(
                file.SourceName,
                name,
                $"the tensor is missing; every FiLM layer needs {string.Join(", ", Parts.Select(p => $"{Prefix}{layer}.{p}"))}.");
        }

        if (tensor.DType != SafeTensorsDType.F32)
        {
            throw new SafeTensorsException(file.SourceName, name, $"dtype is {tensor.DTypeName}; FiLM generator tensors must be F32. Convert them when exporting.");
        }

        return tensor;
    }

    private static void CheckShape(SafeTensorsFile file, SafeTensorInfo tensor, long[] expected, string reference)
    {
        if (!tensor.HasShape(expected))
        {
            throw new SafeTensorsException(
                file.SourceName,
                tensor.Name,
                $"shape is {tensor.ShapeText}; expected {SafeTensorInfo.FormatShape(expected)} to match {reference} (d = {expected[0]}).");
        }
    }

    private static float[] ReadFinite(SafeTensorsFile file, SafeTensorInfo tensor)
    {
        var values = file.ReadFloats(tensor.Name);
        for (var i = 0; i < values.Length; i++)
        {
            if (!float.IsFinite(values[i]))
            {
                throw new SafeTensorsException(file.SourceName, tensor.Name, $"element {i} is {values[i].ToString(CultureInfo.InvariantCulture)}; FiLM generator weights must be finite.");
            }
        }

        return values;
    }

    [GeneratedRegex(@"^film\.(?<layer>0|[1-9][0-9]{0,8})\.(gamma|beta)\.(weight|bias)$", RegexOptions.CultureInvariant)]
    private static partial Regex TensorName();

    private sealed record LayerWeights(int Width, float[] GammaWeight, float[] GammaBias, float[] BetaWeight, float[] BetaBias);
}
