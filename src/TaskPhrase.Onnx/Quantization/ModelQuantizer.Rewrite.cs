using System.Buffers.Binary;
using Google.Protobuf;
using Onnx;

namespace TaskPhrase.Onnx.Quantization;

public static partial class ModelQuantizer
{
    private const int FloatType = 1;
    private const int UInt8Type = 2;
    private const int Int8Type = 3;
    private const int Int64Type = 7;

    /// <summary>MatMuls that share one activation input (e.g. the Q, K and V projections of a layer): they share one smoothing vector and one activation quantiser.</summary>
    internal sealed record MatMulGroup(string Activation, int Channels, IReadOnlyList<NodeProto> MatMuls);

    /// <summary>
    /// How one group is rewritten (for measurements of variants; the quantiser's own plan is <see cref="DefaultPlan"/>):
    /// left in fp32 (<paramref name="Quantize"/> false), per-token or per-tensor activation scales, the smoothing α
    /// (null: the options' α), a simulation of one side's error only, and how many outlier input channels stay in fp32
    /// (<see cref="OutlierChannels"/>).
    /// </summary>
    internal sealed record GroupPlan(bool Quantize, bool PerToken, double? Alpha = null, SimulatedError Simulate = SimulatedError.None, int Fp32Channels = 0);

    /// <summary>Measurements only: quantise one side of a group's MatMuls and run the product in fp32 (quantise, dequantise), to see which side's error matters.</summary>
    internal enum SimulatedError
    {
        /// <summary>The real int8 rewrite.</summary>
        None,

        /// <summary>Smoothed fp32 activations times dequantised int8 weights.</summary>
        WeightsOnly,

        /// <summary>Quantised-dequantised activations (per token or per tensor as planned) times smoothed fp32 weights.</summary>
        ActivationsOnly,
    }

    /// <summary>
    /// Input channels of each wide group (the feed-forward down-projection) that stay in fp32: those with the largest
    /// smoothed weight rows (<see cref="OutlierChannels"/>). Measured on 3,000 CLINC150 training queries with 1, 2, 4,
    /// 8, 16 and 32 (docs/int8.md): one already lifts the min cosine from 0.980 to 0.993, more change little.
    /// </summary>
    internal const int WideFp32Channels = 4;

    /// <summary>
    /// The plan of the method: every group quantised; groups wider than the narrowest per token, with their
    /// <see cref="WideFp32Channels"/> outlier channels in fp32; the rest per tensor.
    /// </summary>
    internal static GroupPlan DefaultPlan(IReadOnlyList<MatMulGroup> groups, int index)
    {
        bool wide = groups[index].Channels > groups.Min(g => g.Channels);
        return new(true, wide, Fp32Channels: wide ? WideFp32Channels : 0);
    }

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
    /// (the feed-forward down-projections, fed by GELU) quantise their activation per token instead of per tensor
    /// (<see cref="AddPerTokenQuantization"/>) and keep <see cref="WideFp32Channels"/> outlier input channels in fp32:
    /// their smoothing factor becomes 0 and their weight rows 0 in the int8 product, and <c>Gather</c> → fp32
    /// <c>MatMul</c> with the original rows → <c>Add</c> restores their share. Returns the number of MatMuls rewritten.
    /// </summary>
    internal static int Rewrite(ModelProto model, IReadOnlyList<MatMulGroup> groups, IReadOnlyDictionary<string, float[]> activationMaxima,
        double alpha, CancellationToken cancellationToken, Func<IReadOnlyList<MatMulGroup>, int, GroupPlan>? plan = null)
    {
        plan ??= DefaultPlan;
        var graph = model.Graph;
        var initializers = graph.Initializer.ToDictionary(t => t.Name, StringComparer.Ordinal);
        var names = new HashSet<string>(StringComparer.Ordinal);
        foreach (var n in graph.Node) { names.UnionWith(n.Input); names.UnionWith(n.Output); if (n.Name.Length > 0) names.Add(n.Name); }
        names.UnionWith(initializers.Keys);
        string Fresh(string name) => names.Add(name) ? name : throw new InvalidDataException($"The model already has a tensor or node named '{name}'; cannot rewrite it.");

        var replacements = new Dictionary<NodeProto, List<NodeProto>>(ReferenceEqualityComparer.Instance);
        var removed = new HashSet<string>(StringComparer.Ordinal);
        int count = 0;
        for (int index = 0; index < groups.Count; index++)
        {
            cancellationToken.ThrowIfCancellationRequested();
            var group = groups[index];
            var setting = plan(groups, index);
            if (!setting.Quantize) continue;
            int k = group.Channels;
            var weights = group.MatMuls.Select(m => ReadFloats(initializers[m.Input[1]])).ToList();
            var smoothing = SmoothingFactors(activationMaxima[group.Activation], weights, k, setting.Alpha ?? alpha);

            string x = group.Activation;
            string inverse = Fresh(x + "_smooth_inverse"), smoothed = Fresh(x + "_smoothed");
            int[] outliers = OutlierChannels(weights, smoothing, k, setting.Fp32Channels);
            var inverseValues = smoothing.Select(s => 1f / s).ToArray();
            foreach (int j in outliers) inverseValues[j] = 0f;
            graph.Initializer.Add(FloatTensor(inverse, [k], inverseValues));
            var prefix = new List<NodeProto> { Node("Mul", Fresh(x + "_smooth"), [x, inverse], [smoothed]) };
            string? outlierInput = null;
            if (outliers.Length > 0)
            {
                string indices = Fresh(x + "_fp32_channels");
                outlierInput = Fresh(x + "_fp32_part");
                graph.Initializer.Add(Int64Tensor(indices, outliers.Select(j => (long)j).ToArray()));
                prefix.Add(WithInt(Node("Gather", Fresh(x + "_fp32_part_of"), [x, indices], [outlierInput]), "axis", -1));
            }
            if (setting.Simulate != SimulatedError.None)
            {
                count += RewriteSimulated(graph, group, setting, weights, smoothing, smoothed, prefix, replacements, removed, initializers, Fresh);
                continue;
            }
            // Wide inputs (the feed-forward down-projection, fed by GELU) lose too much with one per-tensor 8-bit range:
            // a token with much larger outputs than the rest sets every token's step; per-token scales avoid that.
            bool perToken = setting.PerToken;
            string xq, xScale, xZero;
            if (perToken)
                (xq, xScale, xZero) = AddPerTokenQuantization(graph, prefix, smoothed, x, k, Fresh);
            else
            {
                xq = Fresh(x + "_quantized"); xScale = Fresh(x + "_scale"); xZero = Fresh(x + "_zero_point");
                prefix.Add(Node("DynamicQuantizeLinear", Fresh(x + "_quantize"), [smoothed], [xq, xScale, xZero]));
            }

            for (int g = 0; g < group.MatMuls.Count; g++)
            {
                var matMul = group.MatMuls[g];
                var w = initializers[matMul.Input[1]];
                int n = checked((int)w.Dims[1]);
                var extra = new List<NodeProto>();
                var int8Rows = weights[g];
                string baseName = matMul.Name.Length > 0 ? matMul.Name : matMul.Output[0];
                string result = matMul.Output[0];
                string? outlierProduct = null;
                if (outlierInput is not null)
                {
                    // The outlier channels' rows stay in fp32 (a small MatMul on the gathered channels, added to the
                    // int8 product); in the int8 weight they are zero, so they no longer set the column scales.
                    int8Rows = (float[])int8Rows.Clone();
                    var rowsOut = new float[outliers.Length * n];
                    for (int o = 0; o < outliers.Length; o++)
                    {
                        Array.Copy(int8Rows, outliers[o] * n, rowsOut, o * n, n);
                        Array.Clear(int8Rows, outliers[o] * n, n);
                    }
                    string wOut = Fresh(w.Name + "_fp32_rows");
                    outlierProduct = Fresh(baseName + "_fp32_part");
                    result = Fresh(baseName + "_int8_part");
                    graph.Initializer.Add(FloatTensor(wOut, [outliers.Length, n], rowsOut));
                    (g == 0 ? prefix : extra).Add(Node("MatMul", Fresh(baseName + "_fp32_part_of"), [outlierInput, wOut], [outlierProduct]));
                }
                var (quantized, scales) = QuantizeColumns(int8Rows, smoothing, k, n);
                string wq = Fresh(w.Name + "_int8"), wScale = Fresh(w.Name + "_scale");
                string product = Fresh(baseName + "_int32"), asFloat = Fresh(baseName + "_float"), scale = Fresh(baseName + "_output_scale");
                graph.Initializer.Add(new TensorProto { Name = wq, DataType = Int8Type, Dims = { k, n }, RawData = ByteString.CopyFrom(quantized) });
                graph.Initializer.Add(FloatTensor(wScale, [n], scales));
                var cast = Node("Cast", Fresh(baseName + "_cast"), [product], [asFloat]);
                cast.Attribute.Add(new AttributeProto { Name = "to", Type = AttributeProto.Types.AttributeType.Int, I = FloatType });
                var nodes = g == 0 ? prefix : extra;
                nodes.Add(Node("MatMulInteger", Fresh(baseName + "_integer"), [xq, wq, xZero], [product]));
                nodes.Add(cast);
                if (perToken)
                {
                    // [rows, n] · row scale [rows, 1] · column scale [n], then back to the MatMul's own shape: its
                    // input's shape with the last axis replaced by n.
                    string rowScaled = Fresh(baseName + "_row_scaled"), rows = Fresh(baseName + "_rows_output");
                    string inShape = Fresh(baseName + "_input_shape"), lead = Fresh(baseName + "_leading_shape"), outShape = Fresh(baseName + "_output_shape");
                    string start = Fresh(baseName + "_shape_start"), end = Fresh(baseName + "_shape_end"), last = Fresh(baseName + "_shape_last");
                    graph.Initializer.Add(Int64Tensor(start, [0]));
                    graph.Initializer.Add(Int64Tensor(end, [-1]));
                    graph.Initializer.Add(Int64Tensor(last, [n]));
                    nodes.Add(Node("Mul", Fresh(baseName + "_row_rescale"), [asFloat, xScale], [rowScaled]));
                    nodes.Add(Node("Mul", Fresh(baseName + "_rescale"), [rowScaled, wScale], [rows]));
                    nodes.Add(Node("Shape", Fresh(baseName + "_input_shape_of"), [matMul.Input[0]], [inShape]));
                    nodes.Add(Node("Slice", Fresh(baseName + "_leading_shape_of"), [inShape, start, end], [lead]));
                    nodes.Add(WithInt(Node("Concat", Fresh(baseName + "_output_shape_of"), [lead, last], [outShape]), "axis", 0));
                    nodes.Add(Node("Reshape", Fresh(baseName + "_output_reshape"), [rows, outShape], [result]));
                }
                else
                {
                    nodes.Add(Node("Mul", Fresh(baseName + "_scales"), [xScale, wScale], [scale]));
                    nodes.Add(Node("Mul", Fresh(baseName + "_rescale"), [asFloat, scale], [result]));
                }
                if (outlierProduct is not null)
                    nodes.Add(Node("Add", Fresh(baseName + "_fp32_part_add"), [result, outlierProduct], [matMul.Output[0]]));
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

    /// <summary>
    /// The <paramref name="count"/> input channels whose smoothed weight rows have the largest max |s_j·W_jc| over the
    /// group's weights (ties to the lower index), in ascending order: these stay in fp32.
    /// </summary>
    internal static int[] OutlierChannels(IReadOnlyList<float[]> weights, float[] smoothing, int k, int count)
    {
        if (count <= 0) return [];
        var rowMax = new double[k];
        foreach (var w in weights)
        {
            int n = w.Length / k;
            for (int j = 0; j < k; j++)
                for (int c = 0; c < n; c++) rowMax[j] = Math.Max(rowMax[j], Math.Abs(w[j * n + c]) * (double)smoothing[j]);
        }
        return Enumerable.Range(0, k).OrderByDescending(j => rowMax[j]).ThenBy(j => j).Take(Math.Min(count, k)).Order().ToArray();
    }

    /// <summary>The group's MatMuls in fp32 with one side quantised and dequantised (<see cref="SimulatedError"/>).</summary>
    private static int RewriteSimulated(GraphProto graph, MatMulGroup group, GroupPlan setting, List<float[]> weights, float[] smoothing,
        string smoothed, List<NodeProto> prefix, Dictionary<NodeProto, List<NodeProto>> replacements, HashSet<string> removed,
        Dictionary<string, TensorProto> initializers, Func<string, string> fresh)
    {
        string x = group.Activation;
        int k = group.Channels;
        string input = smoothed;
        if (setting.Simulate == SimulatedError.ActivationsOnly)
        {
            input = fresh(x + "_dequantized");
            if (setting.PerToken)
            {
                var (xq, rowScale, _) = AddPerTokenQuantization(graph, prefix, smoothed, x, k, fresh);
                string asFloat = fresh(x + "_q_float"), centred = fresh(x + "_q_centred"), rows = fresh(x + "_q_rows"), shape = fresh(x + "_q_shape");
                string offset = fresh(x + "_q_offset");
                graph.Initializer.Add(FloatTensor(offset, [], [128f]));
                var cast = Node("Cast", fresh(x + "_q_cast"), [xq], [asFloat]);
                cast.Attribute.Add(new AttributeProto { Name = "to", Type = AttributeProto.Types.AttributeType.Int, I = FloatType });
                prefix.Add(cast);
                prefix.Add(Node("Sub", fresh(x + "_q_centre"), [asFloat, offset], [centred]));
                prefix.Add(Node("Mul", fresh(x + "_q_rescale"), [centred, rowScale], [rows]));
                prefix.Add(Node("Shape", fresh(x + "_q_shape_of"), [x], [shape]));
                prefix.Add(Node("Reshape", fresh(x + "_q_reshape"), [rows, shape], [input]));
            }
            else
            {
                string xq = fresh(x + "_quantized"), xScale = fresh(x + "_scale"), xZero = fresh(x + "_zero_point");
                prefix.Add(Node("DynamicQuantizeLinear", fresh(x + "_quantize"), [smoothed], [xq, xScale, xZero]));
                prefix.Add(Node("DequantizeLinear", fresh(x + "_dequantize"), [xq, xScale, xZero], [input]));
            }
        }
        for (int g = 0; g < group.MatMuls.Count; g++)
        {
            var matMul = group.MatMuls[g];
            var w = initializers[matMul.Input[1]];
            int n = checked((int)w.Dims[1]);
            float[] used;
            if (setting.Simulate == SimulatedError.WeightsOnly)
            {
                var (q, scales) = QuantizeColumns(weights[g], smoothing, k, n);
                used = new float[k * n];
                for (int j = 0; j < k; j++)
                    for (int c = 0; c < n; c++)
                        used[j * n + c] = (sbyte)q[j * n + c] * scales[c];
            }
            else
            {
                used = new float[k * n];
                for (int j = 0; j < k; j++)
                    for (int c = 0; c < n; c++)
                        used[j * n + c] = weights[g][j * n + c] * smoothing[j];
            }
            string name = fresh(w.Name + "_simulated");
            graph.Initializer.Add(FloatTensor(name, [k, n], used));
            var nodes = g == 0 ? prefix : [];
            nodes.Add(Node("MatMul", fresh((matMul.Name.Length > 0 ? matMul.Name : matMul.Output[0]) + "_simulated"), [input, name], [matMul.Output[0]]));
            replacements[matMul] = nodes;
            removed.Add(w.Name);
        }
        return group.MatMuls.Count;
    }

    /// <summary>
    /// Per-token symmetric 8-bit quantisation of <paramref name="x"/> ([.., k]), appended to <paramref name="nodes"/>:
    /// <c>Reshape</c> to [rows, k]; per row r the step d_r = max_j |x_rj| / 127 (from <c>ReduceMax</c> and
    /// <c>ReduceMin</c>, at least 1e-30); one <c>QuantizeLinear</c> along axis 0 with scale d and zero point 128 (uint8,
    /// so that <c>MatMulInteger</c> runs the u8 × s8 kernels; q − 128 = round-half-even(x / d) in [−127, 127]).
    /// Returns the quantised [rows, k] tensor, the step as [rows, 1] and the scalar zero point 128.
    /// </summary>
    private static (string Quantized, string RowScale, string ZeroPoint) AddPerTokenQuantization(GraphProto graph, List<NodeProto> nodes,
        string x, string prefix, int k, Func<string, string> fresh)
    {
        string rowsShape = fresh(prefix + "_rows_shape"), rows = fresh(prefix + "_rows");
        string max = fresh(prefix + "_row_max"), min = fresh(prefix + "_row_min"), negatedMin = fresh(prefix + "_row_min_negated");
        string absMax = fresh(prefix + "_row_absmax"), step = fresh(prefix + "_row_step"), count = fresh(prefix + "_row_count");
        string rowZero = fresh(prefix + "_row_zero_point"), quantized = fresh(prefix + "_quantized"), column = fresh(prefix + "_row_scale");
        string tiny = fresh(prefix + "_step_floor"), levels = fresh(prefix + "_levels"), axis1 = fresh(prefix + "_axis_one"), zero = fresh(prefix + "_zero_point");
        graph.Initializer.Add(Int64Tensor(rowsShape, [-1, k]));
        graph.Initializer.Add(FloatTensor(tiny, [], [1e-30f]));
        graph.Initializer.Add(FloatTensor(levels, [], [127f]));
        graph.Initializer.Add(Int64Tensor(axis1, [1]));
        graph.Initializer.Add(new TensorProto { Name = zero, DataType = UInt8Type, RawData = ByteString.CopyFrom([(byte)128]) });

        var reduceMax = Node("ReduceMax", fresh(prefix + "_row_max_of"), [rows], [max]);
        var reduceMin = Node("ReduceMin", fresh(prefix + "_row_min_of"), [rows], [min]);
        foreach (var reduce in new[] { reduceMax, reduceMin })
        {
            var axes = new AttributeProto { Name = "axes", Type = AttributeProto.Types.AttributeType.Ints };
            axes.Ints.Add(1);
            reduce.Attribute.Add(axes);
            WithInt(reduce, "keepdims", 0);
        }
        var zeros = Node("ConstantOfShape", fresh(prefix + "_row_zero_point_of"), [count], [rowZero]);
        zeros.Attribute.Add(new AttributeProto
        {
            Name = "value",
            Type = AttributeProto.Types.AttributeType.Tensor,
            T = new TensorProto { DataType = UInt8Type, Dims = { 1 }, RawData = ByteString.CopyFrom([(byte)128]) },
        });
        nodes.Add(Node("Reshape", fresh(prefix + "_rows_of"), [x, rowsShape], [rows]));
        nodes.Add(reduceMax);
        nodes.Add(reduceMin);
        nodes.Add(Node("Neg", fresh(prefix + "_row_min_negate"), [min], [negatedMin]));
        nodes.Add(Node("Max", fresh(prefix + "_row_absmax_of"), [max, negatedMin, tiny], [absMax]));
        nodes.Add(Node("Div", fresh(prefix + "_row_step_of"), [absMax, levels], [step]));
        nodes.Add(Node("Shape", fresh(prefix + "_row_count_of"), [step], [count]));
        nodes.Add(zeros);
        nodes.Add(WithInt(Node("QuantizeLinear", fresh(prefix + "_quantize"), [rows, step, rowZero], [quantized]), "axis", 0));
        nodes.Add(Node("Unsqueeze", fresh(prefix + "_row_scale_of"), [step, axis1], [column]));
        return (quantized, column, zero);
    }

    private static NodeProto WithInt(NodeProto node, string name, long value)
    {
        node.Attribute.Add(new AttributeProto { Name = name, Type = AttributeProto.Types.AttributeType.Int, I = value });
        return node;
    }

    private static TensorProto Int64Tensor(string name, long[] values)
    {
        var bytes = new byte[values.Length * 8];
        for (int i = 0; i < values.Length; i++) BinaryPrimitives.WriteInt64LittleEndian(bytes.AsSpan(i * 8), values[i]);
        return new TensorProto { Name = name, DataType = Int64Type, Dims = { values.Length }, RawData = ByteString.CopyFrom(bytes) };
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
