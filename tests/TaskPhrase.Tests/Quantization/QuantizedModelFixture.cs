using TaskPhrase.Onnx;
using TaskPhrase.Onnx.Quantization;

namespace TaskPhrase.Tests.Quantization;

/// <summary>Quantises the built-in all-MiniLM-L6-v2 once per test run (with the CLINC150 gate) into a temporary directory, and loads both variants.</summary>
public sealed class QuantizedModelFixture : IDisposable
{
    public QuantizedModelFixture()
    {
        Root = Directory.CreateTempSubdirectory("taskphrase-int8-").FullName;
        ModelDirectory = Path.Combine(Root, "all-minilm-l6-v2-int8");
        // With the CLINC150 gate (Larson et al., 2019): the card then carries its audit figures.
        Result = ModelQuantizer.Quantize(BuiltInModels.MiniLmL6V2, ModelDirectory, new QuantizationOptions { Clinc150Path = TestPaths.Clinc150 });
        Fp32 = OnnxEmbedder.CreateDefault();
        Int8 = Result.Passed ? OnnxEmbedder.Create(ModelDirectory) : null;
        if (Result.Passed) Graph = GraphSummary.Read(Path.Combine(ModelDirectory, "model.onnx"));
    }

    /// <summary>
    /// The written graph's operators, read here once (parsing the model takes tens of MiB of managed memory; done
    /// while the fixture is built, it does not overlap the managed-heap soak test of another collection).
    /// </summary>
    public GraphSummary? Graph { get; }

    public string Root { get; }

    public string ModelDirectory { get; }

    public QuantizationResult Result { get; }

    public OnnxEmbedder Fp32 { get; }

    /// <summary>The int8 embedder, or null when quantisation failed its gates (tests then fail on <see cref="Result"/>).</summary>
    public OnnxEmbedder? Int8 { get; }

    public void Dispose()
    {
        Int8?.Dispose();
        Fp32.Dispose();
        Directory.Delete(Root, recursive: true);
    }
}

/// <summary>Operator counts of a model graph, the non-standard operators, and for each QuantizeLinear its axis and the constant shape of the Reshape feeding it.</summary>
public sealed record GraphSummary(IReadOnlyDictionary<string, int> OpCounts, IReadOnlyList<string> NonStandard, IReadOnlyList<(long Axis, long[] InputShape)> QuantizeLinear)
{
    public static GraphSummary Read(string modelPath)
    {
        var model = global::Onnx.ModelProto.Parser.ParseFrom(File.ReadAllBytes(modelPath));
        var nodes = model.Graph.Node;
        var producers = nodes.SelectMany(n => n.Output.Select(o => (o, n))).ToDictionary(p => p.o, p => p.n);
        var initializers = model.Graph.Initializer.ToDictionary(t => t.Name);
        var quantize = new List<(long, long[])>();
        foreach (var q in nodes.Where(n => n.OpType == "QuantizeLinear"))
        {
            long axis = q.Attribute.SingleOrDefault(a => a.Name == "axis")?.I ?? 1;
            var reshape = producers.GetValueOrDefault(q.Input[0]);
            long[] shape = reshape?.OpType == "Reshape" && initializers.TryGetValue(reshape.Input[1], out var t)
                ? Enumerable.Range(0, t.RawData.Length / 8).Select(i => BitConverter.ToInt64(t.RawData.Span[(i * 8)..])).ToArray()
                : [];
            quantize.Add((axis, shape));
        }
        return new GraphSummary(
            nodes.GroupBy(n => n.OpType).ToDictionary(g => g.Key, g => g.Count()),
            nodes.Where(n => n.Domain is not ("" or "ai.onnx")).Select(n => $"{n.Name}: {n.Domain}.{n.OpType}").ToList(),
            quantize);
    }
}

[CollectionDefinition(Name)]
public sealed class QuantizedModelCollection : ICollectionFixture<QuantizedModelFixture>
{
    public const string Name = "quantized-model";
}
