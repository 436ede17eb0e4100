using System.Buffers.Binary;
using Google.Protobuf;
using Onnx;

namespace TaskPhrase.Onnx.Quantization;

public static partial class ModelQuantizer
{
    private const int FloatType = 1;
    private const int Int8Type = 3;

    /// <summary>MatMuls that share one activation input (e.g. the Q, K and V projections of a layer): they share one smoothing vector and one activation quantiser.</summary>
    internal sealed record MatMulGroup(string Activation, int Channels, IReadOnlyList<NodeProto> MatMuls);

    /// <summary>Every MatMul whose weight (input B) is a 2-D float initializer used by that node alone, grouped by activation, in graph order.</summary>
    internal static IReadOnlyList<MatMulGroup> FindQuantizableMatMuls(GraphProto graph, string modelPath)
    {
        var initializers = graph.Initializer.ToDictionary(t => t.Name, StringComparer.Ordinal);
        var uses = new Dictionary<string, int>(StringComparer.Ordinal);
        foreach (var node in graph.Node)
            foreach (var input in node.Input)
                uses[input] = uses.GetValueOrDefault(input) + 1;
        var groups = new List<(string Activation, int Channels, List<NodeProto> Nodes)>();
        foreach (var node in graph.Node)
        {
            if (node.OpType != "MatMul" || node.Domain is not ("" or "ai.onnx") || node.Input.Count != 2) continue;
            if (!initializers.TryGetValue(node.Input[1], out var w) || w.DataType != FloatType || w.Dims.Count != 2) continue;
            if (uses[node.Input[1]] != 1 || initializers.ContainsKey(node.Input[0])) continue;
            int channels = checked((int)w.Dims[0]);
            int index = groups.FindIndex(g => g.Activation == node.Input[0]);
            if (index < 0) groups.Add((node.Input[0], channels, [node]));
            else if (groups[index].Channels != channels)
                throw new InvalidDataException($"{modelPath}: MatMul '{node.Name}' reads '{node.Input[0]}' with {channels} input channels, but another MatMul reads it with {groups[index].Channels}.");
            else groups[index].Nodes.Add(node);
        }
        if (groups.Count == 0)
            throw new InvalidDataException($"{modelPath}: no MatMul with a constant 2-D float weight was found; nothing to quantise.");
        return groups.Select(g => new MatMulGroup(g.Activation, g.Channels, g.Nodes)).ToList();
    }

    /// <summary>
    /// Rewrites each group in place: <c>Mul(x, 1/s)</c> → <c>DynamicQuantizeLinear</c>, and per MatMul
    /// <c>MatMulInteger(x_q, W_q, x_zp)</c> → <c>Cast</c> → <c>Mul(·, x_scale · w_scale)</c>, with
    /// W_q = round(diag(s)·W / w_scale) and w_scale = column max|diag(s)·W| / 127. Groups wider than the narrowest
    /// (the feed-forward down-projections) quantise their activation in two passes (value, then remainder).
    /// Returns the number of MatMuls rewritten.
    /// </summary>
    internal static int Rewrite(ModelProto model, IReadOnlyList<MatMulGroup> groups, IReadOnlyDictionary<string, float[]> activationMaxima,
        double alpha, CancellationToken cancellationToken)
    {
        var graph = model.Graph;
        var initializers = graph.Initializer.ToDictionary(t => t.Name, StringComparer.Ordinal);
        var names = new HashSet<string>(StringComparer.Ordinal);
        foreach (var n in graph.Node) { names.UnionWith(n.Input); names.UnionWith(n.Output); if (n.Name.Length > 0) names.Add(n.Name); }
        names.UnionWith(initializers.Keys);
        string Fresh(string name) => names.Add(name) ? name : throw new InvalidDataException($"The model already has a tensor or node named '{name}'; cannot rewrite it.");

        var replacements = new Dictionary<NodeProto, List<NodeProto>>(ReferenceEqualityComparer.Instance);
        var removed = new HashSet<string>(StringComparer.Ordinal);
        int count = 0;
        int narrowest = groups.Min(g => g.Channels);
        foreach (var group in groups)
        {
            cancellationToken.ThrowIfCancellationRequested();
            int k = group.Channels;
            var weights = group.MatMuls.Select(m => ReadFloats(initializers[m.Input[1]])).ToList();
            var smoothing = SmoothingFactors(activationMaxima[group.Activation], weights, k, alpha);

            string x = group.Activation;
            string inverse = Fresh(x + "_smooth_inverse"), smoothed = Fresh(x + "_smoothed");
            string xq = Fresh(x + "_quantized"), xScale = Fresh(x + "_scale"), xZero = Fresh(x + "_zero_point");
            graph.Initializer.Add(FloatTensor(inverse, [k], smoothing.Select(s => 1f / s).ToArray()));
            var prefix = new List<NodeProto>
            {
                Node("Mul", Fresh(x + "_smooth"), [x, inverse], [smoothed]),
                Node("DynamicQuantizeLinear", Fresh(x + "_quantize"), [smoothed], [xq, xScale, xZero]),
            };
            // Wide inputs (the feed-forward down-projection, fed by GELU) lose too much in one 8-bit pass: quantise the
            // remainder x − dequantize(x_q) a second time and add the second integer product (still int8 × int8).
            bool twoPass = group.Channels > narrowest;
            string rq = "", rScale = "", rZero = "";
            if (twoPass)
            {
                string dequantized = Fresh(x + "_dequantized"), remainder = Fresh(x + "_remainder");
                rq = Fresh(x + "_remainder_quantized"); rScale = Fresh(x + "_remainder_scale"); rZero = Fresh(x + "_remainder_zero_point");
                prefix.Add(Node("DequantizeLinear", Fresh(x + "_dequantize"), [xq, xScale, xZero], [dequantized]));
                prefix.Add(Node("Sub", Fresh(x + "_subtract"), [smoothed, dequantized], [remainder]));
                prefix.Add(Node("DynamicQuantizeLinear", Fresh(x + "_remainder_quantize"), [remainder], [rq, rScale, rZero]));
            }

            for (int g = 0; g < group.MatMuls.Count; g++)
            {
                var matMul = group.MatMuls[g];
                var w = initializers[matMul.Input[1]];
                int n = checked((int)w.Dims[1]);
                var (quantized, scales) = QuantizeColumns(weights[g], smoothing, k, n);
                string baseName = matMul.Name.Length > 0 ? matMul.Name : matMul.Output[0];
                string wq = Fresh(w.Name + "_int8"), wScale = Fresh(w.Name + "_scale");
                string product = Fresh(baseName + "_int32"), asFloat = Fresh(baseName + "_float"), scale = Fresh(baseName + "_output_scale");
                graph.Initializer.Add(new TensorProto { Name = wq, DataType = Int8Type, Dims = { k, n }, RawData = ByteString.CopyFrom(quantized) });
                graph.Initializer.Add(FloatTensor(wScale, [n], scales));
                var cast = Node("Cast", Fresh(baseName + "_cast"), [product], [asFloat]);
                cast.Attribute.Add(new AttributeProto { Name = "to", Type = AttributeProto.Types.AttributeType.Int, I = FloatType });
                var nodes = g == 0 ? prefix : [];
                nodes.Add(Node("MatMulInteger", Fresh(baseName + "_integer"), [xq, wq, xZero], [product]));
                nodes.Add(cast);
                nodes.Add(Node("Mul", Fresh(baseName + "_scales"), [xScale, wScale], [scale]));
                string first = twoPass ? Fresh(baseName + "_first") : matMul.Output[0];
                nodes.Add(Node("Mul", Fresh(baseName + "_rescale"), [asFloat, scale], [first]));
                if (twoPass)
                {
                    string product2 = Fresh(baseName + "_remainder_int32"), asFloat2 = Fresh(baseName + "_remainder_float");
                    string scale2 = Fresh(baseName + "_remainder_output_scale"), second = Fresh(baseName + "_second");
                    var cast2 = Node("Cast", Fresh(baseName + "_remainder_cast"), [product2], [asFloat2]);
                    cast2.Attribute.Add(new AttributeProto { Name = "to", Type = AttributeProto.Types.AttributeType.Int, I = FloatType });
                    nodes.Add(Node("MatMulInteger", Fresh(baseName + "_remainder_integer"), [rq, wq, rZero], [product2]));
                    nodes.Add(cast2);
                    nodes.Add(Node("Mul", Fresh(baseName + "_remainder_scales"), [rScale, wScale], [scale2]));
                    nodes.Add(Node("Mul", Fresh(baseName + "_remainder_rescale"), [asFloat2, scale2], [second]));
                    nodes.Add(Node("Add", Fresh(baseName + "_sum"), [first, second], [matMul.Output[0]]));
                }
                replacements[matMul] = nodes;
                removed.Add(w.Name);
                count++;
            }
        }

        var rebuilt = new List<NodeProto>(graph.Node.Count + 4 * count);
        foreach (var node in graph.Node)
        {
            if (replacements.TryGetValue(node, out var nodes)) rebuilt.AddRange(nodes);
            else rebuilt.Add(node);
        }
        graph.Node.Clear();
        graph.Node.AddRange(rebuilt);
        var kept = graph.Initializer.Where(t => !removed.Contains(t.Name)).ToList();
        graph.Initializer.Clear();
        graph.Initializer.AddRange(kept);
        for (int i = graph.Input.Count - 1; i >= 0; i--)
            if (removed.Contains(graph.Input[i].Name)) graph.Input.RemoveAt(i);
        model.ProducerName = "TaskPhrase.ModelQuantizer";
        model.ProducerVersion = Method;
        return count;
    }

    /// <summary>s_j = max|X_j|^α / max_n|W_jn|^(1−α) over all weights of the group, clamped to [1e-4, 1e4]; 1 where a maximum is 0.</summary>
    internal static float[] SmoothingFactors(float[] activationMax, IReadOnlyList<float[]> weights, int k, double alpha)
    {
        var s = new float[k];
        for (int j = 0; j < k; j++)
        {
            float wMax = 0;
            foreach (var w in weights)
            {
                int n = w.Length / k;
                for (int c = 0; c < n; c++) wMax = Math.Max(wMax, Math.Abs(w[j * n + c]));
            }
            float aMax = activationMax[j];
            double value = aMax > 0 && wMax > 0 ? Math.Pow(aMax, alpha) / Math.Pow(wMax, 1 - alpha) : 1.0;
            s[j] = (float)Math.Clamp(value, 1e-4, 1e4);
        }
        return s;
    }

    /// <summary>Per-column symmetric int8 of diag(s)·W ([k, n], row-major): scale_c = max_j|W'_jc| / 127, q = round-half-even(W'/scale) in [−127, 127].</summary>
    internal static (byte[] Quantized, float[] Scales) QuantizeColumns(float[] w, float[] s, int k, int n)
    {
        var scaled = new float[w.Length];
        for (int j = 0; j < k; j++)
            for (int c = 0; c < n; c++)
                scaled[j * n + c] = w[j * n + c] * s[j];
        var scales = new float[n];
        for (int c = 0; c < n; c++)
        {
            float max = 0;
            for (int j = 0; j < k; j++) max = Math.Max(max, Math.Abs(scaled[j * n + c]));
            scales[c] = max > 0 ? max / 127f : 1f;
        }
        var q = new byte[w.Length];
        for (int j = 0; j < k; j++)
            for (int c = 0; c < n; c++)
                q[j * n + c] = unchecked((byte)(sbyte)Math.Clamp(MathF.Round(scaled[j * n + c] / scales[c], MidpointRounding.ToEven), -127f, 127f));
        return (q, scales);
    }

    private static NodeProto Node(string op, string name, string[] inputs, string[] outputs)
    {
        var node = new NodeProto { OpType = op, Name = name };
        node.Input.AddRange(inputs);
        node.Output.AddRange(outputs);
        return node;
    }

    private static TensorProto FloatTensor(string name, long[] dims, float[] values)
    {
        var bytes = new byte[values.Length * 4];
        for (int i = 0; i < values.Length; i++) BinaryPrimitives.WriteSingleLittleEndian(bytes.AsSpan(i * 4), values[i]);
        var t = new TensorProto { Name = name, DataType = FloatType, RawData = ByteString.CopyFrom(bytes) };
        t.Dims.AddRange(dims);
        return t;
    }

    private static float[] ReadFloats(TensorProto t)
    {
        if (t.DataLocation == TensorProto.Types.DataLocation.External)
            throw new InvalidDataException($"Initializer '{t.Name}' is stored in an external file; only self-contained models can be quantised.");
        if (t.RawData.Length > 0)
        {
            var span = t.RawData.Span;
            var values = new float[span.Length / 4];
            for (int i = 0; i < values.Length; i++) values[i] = BinaryPrimitives.ReadSingleLittleEndian(span[(i * 4)..]);
            return values;
        }
        return t.FloatData.ToArray();
    }
}
