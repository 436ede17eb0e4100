using System.Globalization;
using System.Numerics.Tensors;
using System.Security.Cryptography;
using Onnx;
using TaskPhrase.Onnx.Quantization;

namespace TaskPhrase.Onnx;

/// <summary>
/// Writes a variant of a BERT-style model directory whose token states are the outputs of several encoder layers side
/// by side (one ONNX <c>Concat</c> on the last axis; the source's weights and every other node unchanged), so the
/// pooled, L2-normalised embedding carries an intermediate layer's view of the sentence next to the last layer's.
/// Pooling the outputs of several layers of a frozen encoder is common practice for feature extraction; on CLINC150
/// with 10 phrases per intent, layers 4 and 6 of all-MiniLM-L6-v2 raised the learned head's held-out in-scope accuracy
/// at a 5 % wrong-task budget from 75.5 % to 78.1 % (docs/clinc150-strategies.md). Deterministic: the same source and
/// layers give byte-identical files. The new model is checked before it is written: its embeddings of the built-in
/// held-out phrases must be finite, and when the last layer is among the chosen ones, the part of the embedding that
/// comes from it, renormalised, must match the source model's embedding.
/// </summary>
/// <remarks>
/// Thread-safe for different output directories: no shared state, each call loads its own sessions. Files are staged
/// beside the output and moved into it one by one, so a failure during the final moves can leave a mix of old and new
/// files (the card's hash then refuses the model at load); write again to repair.
/// </remarks>
public static class LayerPooledModel
{
    /// <summary>Lowest accepted cosine between the source embedding and the last layer's part of the new one.</summary>
    public const double MinLastLayerCosine = 0.9999;

    /// <summary>
    /// The layers used when none are given: the layer at two thirds of the depth (rounded) and the last one; 4 and 6
    /// for a six-layer encoder.
    /// </summary>
    /// <param name="sourceLayers">Number of encoder layers of the source, at least 2.</param>
    /// <exception cref="ArgumentOutOfRangeException"><paramref name="sourceLayers"/> is below 2.</exception>
    public static IReadOnlyList<int> DefaultLayers(int sourceLayers)
    {
        ArgumentOutOfRangeException.ThrowIfLessThan(sourceLayers, 2);
        int middle = Math.Clamp((int)Math.Round(2.0 * sourceLayers / 3, MidpointRounding.AwayFromZero), 1, sourceLayers - 1);
        return [middle, sourceLayers];
    }

    /// <summary>
    /// Writes <c>model.onnx</c>, a copy of <c>vocab.txt</c> and <c>model.json</c> (with a <c>layers</c> section) for
    /// the given layers of the model in <paramref name="sourceDirectory"/> to <paramref name="outputDirectory"/>
    /// (created if needed; those three files are replaced; nothing is written when a check fails).
    /// </summary>
    /// <param name="sourceDirectory">A model directory (model.onnx, vocab.txt, model.json) or a built-in id; not int8, not already layer-pooled.</param>
    /// <param name="outputDirectory">Where to write the new model directory; must differ from the source.</param>
    /// <param name="layers">Encoder layers, 1-based, ascending, at least two or one that is not the last; null for <see cref="DefaultLayers"/>.</param>
    /// <param name="id">Id of the new model; null for <c>&lt;source id&gt;-layers-&lt;l1&gt;-&lt;l2&gt;…</c>.</param>
    /// <param name="cancellationToken">Checked between the steps and during embedding.</param>
    /// <exception cref="DirectoryNotFoundException">The source directory does not exist.</exception>
    /// <exception cref="InvalidDataException">The source is unreadable, int8, already layer-pooled, or not an encoder whose layer norms can be found; or the new model fails its check.</exception>
    /// <exception cref="ArgumentException">The layers are out of range, not ascending or repeated, or the output directory is the source's.</exception>
    /// <exception cref="IOException">The output cannot be written.</exception>
    public static LayerPooledModelResult Write(string sourceDirectory, string outputDirectory, IReadOnlyList<int>? layers = null, string? id = null,
        CancellationToken cancellationToken = default)
    {
        ArgumentException.ThrowIfNullOrEmpty(sourceDirectory);
        ArgumentException.ThrowIfNullOrEmpty(outputDirectory);
        var embedderOptions = new OnnxEmbedderOptions { UseOptimizedModel = false };
        using var source = OnnxEmbedder.Create(sourceDirectory, embedderOptions);
        string sourceDir = Path.GetFullPath(source.ModelDirectory);
        string outputDir = Path.GetFullPath(outputDirectory);
        if (string.Equals(sourceDir.TrimEnd(Path.DirectorySeparatorChar), outputDir.TrimEnd(Path.DirectorySeparatorChar), StringComparison.Ordinal))
            throw new ArgumentException($"The output directory {outputDir} is the source model's directory; choose another.", nameof(outputDirectory));
        string cardPath = Path.Combine(sourceDir, "model.json");
        var sourceCard = ModelCard.Load(cardPath);
        if (sourceCard.IsQuantized)
            throw new InvalidDataException($"{cardPath}: this model is int8 ({sourceCard.Quantization!.Method}); pool the layers of its fp32 source instead.");
        if (sourceCard.Layers is not null)
            throw new InvalidDataException($"{cardPath}: this model already pools layers {string.Join(", ", sourceCard.Layers.Layers)} of {sourceCard.Layers.SourceModelId}; start from that source instead.");

        string modelPath = Path.Combine(sourceDir, "model.onnx");
        ModelProto model;
        try
        {
            model = ModelProto.Parser.ParseFrom(File.ReadAllBytes(modelPath));
        }
        catch (Google.Protobuf.InvalidProtocolBufferException e)
        {
            throw new InvalidDataException($"{modelPath}: not a readable ONNX model ({e.Message}).", e);
        }
        var (outputName, layerOutputs) = FindLayerOutputs(model.Graph, modelPath);
        int depth = layerOutputs.Count;
        if (depth < 2)
            throw new InvalidDataException($"{modelPath}: the encoder has one layer; there is nothing to pool beside it.");
        if (id is not null && string.IsNullOrWhiteSpace(id))
            throw new ArgumentException("The id of the new model must not be empty; leave it out for <source id>-layers-<l1>-<l2>….", nameof(id));
        var chosen = CheckLayers(layers ?? DefaultLayers(depth), depth);
        if ((long)sourceCard.Dimensions * chosen.Length > 65536)
            throw new ArgumentException($"{chosen.Length} layers of {sourceCard.Dimensions} dimensions exceed the 65,536 a model card allows; choose fewer layers.", nameof(layers));
        cancellationToken.ThrowIfCancellationRequested();

        Rewrite(model.Graph, outputName, layerOutputs, chosen, sourceCard.Dimensions);
        byte[] bytes = Google.Protobuf.MessageExtensions.ToByteArray(model);
        string label = string.Join("-", chosen.Select(l => l.ToString(CultureInfo.InvariantCulture)));
        var info = new ModelLayersInfo
        {
            Layers = chosen,
            SourceLayers = depth,
            SourceModelId = sourceCard.Id,
            SourceModelSha256 = source.Model.Sha256,
        };
        var card = sourceCard with
        {
            Id = id ?? $"{sourceCard.Id}-layers-{label}",
            Dimensions = sourceCard.Dimensions * chosen.Length,
            ModelSha256 = Convert.ToHexStringLower(SHA256.HashData(bytes)),
            Source = $"layers {string.Join(", ", chosen)} of {depth} side by side ({sourceCard.Pooling} pooling) of {sourceCard.Id}: {sourceCard.Source}",
            Layers = info,
        };

        string staging = ModelQuantizer.CreateStaging(outputDir, "the layer-pooled model");
        try
        {
            File.WriteAllBytes(Path.Combine(staging, "model.onnx"), bytes);
            File.Copy(Path.Combine(sourceDir, "vocab.txt"), Path.Combine(staging, "vocab.txt"));
            double? lastCosine = null;
            using (var pooled = OnnxEmbedder.CreateCore(staging, card, embedderOptions))
                lastCosine = Check(source, pooled, chosen, depth, sourceCard.Dimensions, cancellationToken);
            card = card with { Layers = info with { LastLayerMinCosine = lastCosine } };
            if (lastCosine is { } c && !(c >= MinLastLayerCosine))
                throw new InvalidDataException(string.Create(CultureInfo.InvariantCulture,
                    $"{modelPath}: the rewritten model's last-layer part reaches only cosine {c:0.000000} to the source embedding (needs ≥ {MinLastLayerCosine}); the graph was not rewritten as expected, nothing written."));
            File.WriteAllBytes(Path.Combine(staging, "model.json"), ModelQuantizer.SerializeCard(card));
            Directory.CreateDirectory(outputDir);
            foreach (var name in new[] { "model.onnx", "vocab.txt", "model.json" })
                File.Move(Path.Combine(staging, name), Path.Combine(outputDir, name), overwrite: true);
            return new LayerPooledModelResult(outputDir, card);
        }
        catch (UnauthorizedAccessException e)
        {
            throw new IOException($"{outputDir}: cannot write the layer-pooled model there ({e.Message}); choose a writable --output directory.", e);
        }
        finally
        {
            if (Directory.Exists(staging)) Directory.Delete(staging, recursive: true);
        }
    }

    /// <summary>
    /// The token-state output of the graph (<c>last_hidden_state</c>, else the first output of rank 3) and each encoder
    /// layer's output tensor, in order: the outputs of the layer norms (a <c>LayerNormalization</c> node, or the
    /// decomposed form: <c>Add</c> of a <c>Mul</c> of a <c>Div</c> by a <c>Sqrt</c>), of which a BERT-style encoder has
    /// one after the embeddings and two per layer, the second ending the layer; the last must be the graph's output.
    /// </summary>
    internal static (string OutputName, IReadOnlyList<string> LayerOutputs) FindLayerOutputs(GraphProto graph, string modelPath)
    {
        var output = graph.Output.FirstOrDefault(o => o.Name == "last_hidden_state")
            ?? graph.Output.FirstOrDefault(o => o.Type?.TensorType?.Shape?.Dim.Count == 3)
            ?? throw new InvalidDataException($"{modelPath}: no output of rank 3 [batch, tokens, dimensions] (outputs: {string.Join(", ", graph.Output.Select(o => o.Name))}).");
        var producer = new Dictionary<string, NodeProto>(StringComparer.Ordinal);
        foreach (var node in graph.Node)
            foreach (var o in node.Output) producer[o] = node;
        bool Produced(string tensor, string op, out NodeProto node) =>
            producer.TryGetValue(tensor, out node!) && node.OpType == op;
        bool IsDecomposedNorm(NodeProto add) =>
            add.OpType == "Add" && add.Input.Any(a => Produced(a, "Mul", out var mul)
                && mul.Input.Any(m => Produced(m, "Div", out var div) && div.Input.Any(d => Produced(d, "Sqrt", out _))));
        var norms = graph.Node.Where(n => n.OpType == "LayerNormalization" || IsDecomposedNorm(n)).Select(n => n.Output[0]).ToList();
        if (norms.Count < 3 || norms.Count % 2 == 0 || norms[^1] != output.Name)
            throw new InvalidDataException(
                $"{modelPath}: found {norms.Count} layer norms{(norms.Count > 0 && norms[^1] != output.Name ? $", the last not feeding the output '{output.Name}'" : "")}; a BERT-style encoder has one after the embeddings and two per layer, the last giving the output. Only such encoders can have their layers pooled.");
        return (output.Name, norms.Where((_, i) => i > 0 && i % 2 == 0).ToList());
    }

    private static int[] CheckLayers(IReadOnlyList<int> layers, int depth)
    {
        ArgumentNullException.ThrowIfNull(layers);
        if (layers.Count == 0) throw new ArgumentException($"Name at least one encoder layer, from 1 to {depth} (e.g. {string.Join(",", DefaultLayers(depth))}).", nameof(layers));
        for (int i = 0; i < layers.Count; i++)
        {
            if (layers[i] < 1 || layers[i] > depth)
                throw new ArgumentException($"Layer {layers[i]} does not exist: the model has encoder layers 1 to {depth}.", nameof(layers));
            if (i > 0 && layers[i] <= layers[i - 1])
                throw new ArgumentException($"Give the layers once each, in ascending order (e.g. {string.Join(",", DefaultLayers(depth))}), not {string.Join(",", layers)}.", nameof(layers));
        }
        if (layers is [var only] && only == depth)
            throw new ArgumentException($"Layer {depth} alone is the source model itself; add an earlier layer (e.g. {string.Join(",", DefaultLayers(depth))}).", nameof(layers));
        return [.. layers];
    }

    /// <summary>Renames the final layer's output, points its consumers at the new name, and concatenates the chosen layers into the graph output.</summary>
    private static void Rewrite(GraphProto graph, string outputName, IReadOnlyList<string> layerOutputs, int[] layers, int width)
    {
        var names = new HashSet<string>(StringComparer.Ordinal);
        foreach (var n in graph.Node) { names.UnionWith(n.Input); names.UnionWith(n.Output); if (n.Name.Length > 0) names.Add(n.Name); }
        names.UnionWith(graph.Initializer.Select(t => t.Name));
        string Fresh(string name) => names.Add(name) ? name : throw new InvalidDataException($"The model already has a tensor or node named '{name}'; cannot rewrite it.");
        string last = Fresh($"{outputName}_layer_{layerOutputs.Count}");
        foreach (var node in graph.Node)
        {
            for (int i = 0; i < node.Input.Count; i++) if (node.Input[i] == outputName) node.Input[i] = last;
            for (int i = 0; i < node.Output.Count; i++) if (node.Output[i] == outputName) node.Output[i] = last;
        }
        var concat = new NodeProto { OpType = "Concat", Name = Fresh($"{outputName}_layers_concat") };
        foreach (int layer in layers) concat.Input.Add(layer == layerOutputs.Count ? last : layerOutputs[layer - 1]);
        concat.Output.Add(outputName);
        concat.Attribute.Add(new AttributeProto { Name = "axis", Type = AttributeProto.Types.AttributeType.Int, I = -1 });
        graph.Node.Add(concat);
        var dims = graph.Output.First(o => o.Name == outputName).Type?.TensorType?.Shape?.Dim;
        if (dims is { Count: > 0 }) dims[^1] = new TensorShapeProto.Types.Dimension { DimValue = (long)width * layers.Length };
    }

    /// <summary>
    /// Embeds the built-in held-out phrases with both models; every value must be finite, and when the last layer is
    /// among <paramref name="layers"/> returns the lowest cosine between the source embedding and the new embedding's
    /// last-layer part (else null).
    /// </summary>
    private static double? Check(OnnxEmbedder source, OnnxEmbedder pooled, int[] layers, int depth, int width, CancellationToken ct)
    {
        var phrases = QuantizationPhrases.HeldOut;
        var (expected, _) = source.EmbedMany(phrases, ct);
        var (actual, _) = pooled.EmbedMany(phrases, ct);
        int part = Array.IndexOf(layers, depth);
        double min = double.PositiveInfinity;
        for (int i = 0; i < phrases.Count; i++)
        {
            foreach (float v in actual[i])
                if (!float.IsFinite(v)) throw new InvalidDataException($"The layer-pooled model gives a non-finite embedding for \"{phrases[i]}\"; nothing written.");
            if (part < 0) continue;
            min = Math.Min(min, TensorPrimitives.CosineSimilarity(expected[i], actual[i].AsSpan(part * width, width)));
        }
        return part < 0 ? null : min;
    }
}

/// <summary>What <see cref="LayerPooledModel.Write"/> wrote.</summary>
/// <param name="OutputDirectory">The model directory written.</param>
/// <param name="Card">Its card, with the <c>layers</c> section.</param>
public sealed record LayerPooledModelResult(string OutputDirectory, ModelCard Card);
