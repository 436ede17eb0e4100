using System.Numerics.Tensors;
using Google.Protobuf;
using Microsoft.ML.OnnxRuntime;
using Onnx;

namespace TaskPhrase.Onnx.Quantization;

public static partial class ModelQuantizer
{
    /// <summary>
    /// Per-channel max |x| of every group's activation over all tokens of the calibration phrases: the activations are
    /// exposed as extra outputs of a temporary copy of the fp32 model, which is run one phrase at a time (no padding
    /// tokens enter the maxima), with one thread so that the maxima are exactly repeatable.
    /// </summary>
    internal static IReadOnlyDictionary<string, float[]> CalibrateActivationMaxima(ModelProto model, IReadOnlyList<MatMulGroup> groups,
        OnnxEmbedder source, IReadOnlyList<string> phrases, CancellationToken cancellationToken)
    {
        var copy = model.Clone();
        var existing = copy.Graph.Output.Select(o => o.Name).ToHashSet(StringComparer.Ordinal);
        foreach (var group in groups)
        {
            if (existing.Contains(group.Activation)) continue;
            copy.Graph.Output.Add(new ValueInfoProto
            {
                Name = group.Activation,
                Type = new TypeProto { TensorType = new TypeProto.Types.Tensor { ElemType = FloatType } },
            });
        }
        using var sessionOptions = new SessionOptions
        {
            GraphOptimizationLevel = GraphOptimizationLevel.ORT_ENABLE_BASIC,
            ExecutionMode = ExecutionMode.ORT_SEQUENTIAL,
            IntraOpNumThreads = 1,
            InterOpNumThreads = 1,
        };
        using var session = new InferenceSession(copy.ToByteArray(), sessionOptions);
        var outputNames = groups.Select(g => g.Activation).ToArray();
        var maxima = groups.ToDictionary(g => g.Activation, g => new float[g.Channels], StringComparer.Ordinal);
        bool types = session.InputMetadata.ContainsKey("token_type_ids");
        int limit = source.Model.MaxTokens;
        var ids = new long[limit];
        var mask = new long[limit];
        var scratch = new float[groups.Max(g => g.Channels)];
        foreach (var phrase in phrases)
        {
            cancellationToken.ThrowIfCancellationRequested();
            var (count, _) = source.Tokenizer.Encode(phrase, ids, mask);
            long[] shape = [1, count];
            using var idsValue = OrtValue.CreateTensorValueFromMemory(ids[..count], shape);
            using var maskValue = OrtValue.CreateTensorValueFromMemory(mask[..count], shape);
            using var typesValue = OrtValue.CreateTensorValueFromMemory(new long[count], shape);
            string[] inputNames = types ? ["input_ids", "attention_mask", "token_type_ids"] : ["input_ids", "attention_mask"];
            OrtValue[] inputs = types ? [idsValue, maskValue, typesValue] : [idsValue, maskValue];
            using var runOptions = new RunOptions();
            using var outputs = session.Run(runOptions, inputNames, inputs, outputNames);
            for (int o = 0; o < outputNames.Length; o++)
            {
                var data = outputs[o].GetTensorDataAsSpan<float>();
                var max = maxima[outputNames[o]];
                int k = max.Length;
                if (data.Length % k != 0)
                    throw new InvalidDataException($"Activation '{outputNames[o]}' has {data.Length} values, not a multiple of its {k} channels.");
                var abs = scratch.AsSpan(0, k);
                for (int row = 0; row < data.Length; row += k)
                {
                    TensorPrimitives.Abs(data.Slice(row, k), abs);
                    TensorPrimitives.Max(max, abs, max);
                }
            }
        }
        return maxima;
    }

    /// <summary>
    /// Cosines between fp32 and int8 embeddings on the held-out phrases, the int8 ones made both one at a time and in
    /// batches (<see cref="OnnxEmbedder.EmbedMany"/>), and both models' Quickstart similarities; figures rounded to
    /// 6 decimals as recorded.
    /// </summary>
    internal static QuantizationQuality Measure(OnnxEmbedder fp32, OnnxEmbedder int8, CancellationToken cancellationToken)
    {
        var heldOut = QuantizationPhrases.HeldOut;
        var (reference, _) = fp32.EmbedMany(heldOut, cancellationToken);
        var (batched, _) = int8.EmbedMany(heldOut, cancellationToken);
        var single = new float[int8.Model.Dimensions];
        double singleMin = double.PositiveInfinity, batchedMin = double.PositiveInfinity, sum = 0;
        for (int i = 0; i < heldOut.Count; i++)
        {
            cancellationToken.ThrowIfCancellationRequested();
            int8.Embed(heldOut[i], single);
            double one = TensorPrimitives.CosineSimilarity(reference[i], single);
            double many = TensorPrimitives.CosineSimilarity(reference[i], batched[i]);
            singleMin = Math.Min(singleMin, one);
            batchedMin = Math.Min(batchedMin, many);
            sum += one + many;
        }
        static double R(double x) => Math.Round(x, 6, MidpointRounding.ToEven);
        return new QuantizationQuality
        {
            HeldOutPhrases = heldOut.Count,
            HeldOutSetSha256 = QuantizationPhrases.Sha256(heldOut),
            MinCosine = R(Math.Min(singleMin, batchedMin)),
            MeanCosine = R(sum / (2 * heldOut.Count)),
            SingleMinCosine = R(singleMin),
            BatchedMinCosine = R(batchedMin),
            SimilarityMatrix = QuickstartMatrix(int8).Select(R).ToArray(),
            SourceSimilarityMatrix = QuickstartMatrix(fp32).Select(R).ToArray(),
        };
    }

    /// <summary>Similarities (0,1), (0,2), (1,2) of <see cref="QuantizationGates.QuickstartSentences"/>.</summary>
    internal static double[] QuickstartMatrix(OnnxEmbedder embedder)
    {
        var (v, _) = embedder.EmbedMany(QuantizationGates.QuickstartSentences);
        return [TensorPrimitives.CosineSimilarity(v[0], v[1]), TensorPrimitives.CosineSimilarity(v[0], v[2]), TensorPrimitives.CosineSimilarity(v[1], v[2])];
    }
}
