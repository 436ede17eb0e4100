using System.Globalization;
using System.Security.Cryptography;
using System.Text.Json;
using System.Text.Json.Serialization;
using Google.Protobuf;
using Microsoft.ML.OnnxRuntime;
using Onnx;

namespace TaskPhrase.Onnx;

/// <summary>
/// The mapped form of a model directory's <c>model.onnx</c>: the same graph and the same weights, but with every large
/// initializer moved to a side file (<c>model.mapped.data</c>, each tensor at a 64 KiB-aligned offset) that the small
/// graph file <c>model.mapped.onnx</c> points to through the standard ONNX external-data fields. ONNX Runtime maps such
/// files into memory instead of copying them: session creation on the benchmark machine fell from about 0.24 s to
/// 0.14 s and the bare session's peak resident memory from 194 MiB to 112–119 MiB (the word-embedding table, half of
/// the file, is only touched row by row), with the same forward-pass speed (docs/benchmarks.md). A record
/// (<c>model.mapped.json</c>) ties both files to the source model by size, write time and SHA-256 and carries the
/// files' own SHA-256, which every load checks beside session creation. <see cref="Write"/> keeps the form only if its
/// embeddings equal the source model's bit for bit. Nothing in it depends on the CPU or the ONNX Runtime version (the
/// graph is unchanged; ONNX Runtime optimises it at load as it does model.onnx). The source's identity (SHA-256) stays
/// the model's identity: an index built either way matches.
/// </summary>
internal static class OptimizedModel
{
    /// <summary>The graph file, beside model.onnx.</summary>
    public const string FileName = "model.mapped.onnx";

    /// <summary>The weights file the graph refers to, beside model.onnx.</summary>
    public const string DataFileName = "model.mapped.data";

    /// <summary>The record of what the files were made from, beside model.onnx.</summary>
    public const string RecordFileName = "model.mapped.json";

    /// <summary>Bumped when the record or the way the files are made changes; other formats are ignored.</summary>
    public const int Format = 2;

    /// <summary>
    /// Offsets of external tensors are multiples of this: ONNX Runtime maps a tensor only when its offset is a multiple
    /// of the system's allocation granularity (4 KiB pages on Linux, 64 KiB on Windows).
    /// </summary>
    public const int Alignment = 65536;

    /// <summary>Initializers at least this large go to the side file; smaller ones (biases, norms) stay in the graph.</summary>
    public const int MinExternalBytes = 16384;

    /// <summary>Files of an earlier form (the ORT-format model of format 1), removed when the mapped form is written.</summary>
    private static readonly string[] Legacy = ["model.ort", "model.ort.json"];

    /// <summary>What <see cref="TryOpen"/> found: the graph file to create the session from, and its record.</summary>
    internal sealed record Opened(string GraphPath, string DataPath, OptimizedModelRecord Record);

    /// <summary>
    /// The mapped form of <paramref name="directory"/> when its record is readable and fits this source model and card
    /// and both files have the recorded sizes; otherwise null with the reason in <paramref name="whyNot"/> (no files is a
    /// reason too). The files' hashes are <em>not</em> checked here (<see cref="Verify"/> does, beside session creation).
    /// </summary>
    public static Opened? TryOpen(string directory, ModelCard card, out string whyNot)
    {
        string recordPath = Path.Combine(directory, RecordFileName);
        string graphPath = Path.Combine(directory, FileName), dataPath = Path.Combine(directory, DataFileName);
        if (!File.Exists(recordPath) || !File.Exists(graphPath) || !File.Exists(dataPath))
        {
            whyNot = $"no {FileName} beside model.onnx (taskphrase prepare writes one)";
            return null;
        }
        OptimizedModelRecord? record;
        try { record = JsonSerializer.Deserialize<OptimizedModelRecord>(File.ReadAllBytes(recordPath)); }
        catch (Exception e) when (e is JsonException or IOException or UnauthorizedAccessException)
        {
            whyNot = $"{recordPath} is unreadable ({e.Message})";
            return null;
        }
        var source = new FileInfo(Path.Combine(directory, "model.onnx"));
        long graphLength = new FileInfo(graphPath).Length, dataLength = new FileInfo(dataPath).Length;
        whyNot = record switch
        {
            null => $"{recordPath} is empty",
            { Format: not Format } => $"{recordPath} has format {record.Format}, this version reads {Format}",
            _ when record.SourceLength != source.Length || record.SourceWriteTimeUtcTicks != source.LastWriteTimeUtc.Ticks
                => $"model.onnx changed after {FileName} was written",
            _ when card.ModelSha256 is { Length: > 0 } expected && !string.Equals(expected, record.SourceSha256, StringComparison.OrdinalIgnoreCase)
                => $"{FileName} was made from a model with SHA-256 {record.SourceSha256}, the card records {card.ModelSha256}",
            _ when graphLength != record.GraphLength => $"{graphPath} has {graphLength} bytes, its record says {record.GraphLength}",
            _ when dataLength != record.DataLength => $"{dataPath} has {dataLength} bytes, its record says {record.DataLength}",
            _ => "",
        };
        return whyNot.Length > 0 ? null : new Opened(graphPath, dataPath, record!);
    }

    /// <summary>
    /// Hashes both files (read through the page cache; nothing of them stays in this process's memory) and returns
    /// an empty string when they match the record, else what differs.
    /// </summary>
    public static string Verify(Opened opened)
    {
        string graph, data;
        try
        {
            graph = HashFile(opened.GraphPath);
            data = HashFile(opened.DataPath);
        }
        catch (Exception e) when (e is IOException or UnauthorizedAccessException)
        {
            return $"{FileName} or {DataFileName} became unreadable ({e.Message})";
        }
        if (!string.Equals(graph, opened.Record.GraphSha256, StringComparison.OrdinalIgnoreCase))
            return $"{FileName} has SHA-256 {graph}, its record says {opened.Record.GraphSha256}";
        if (!string.Equals(data, opened.Record.DataSha256, StringComparison.OrdinalIgnoreCase))
            return $"{DataFileName} has SHA-256 {data}, its record says {opened.Record.DataSha256}";
        return "";
    }

    /// <summary>
    /// SHA-256 of a file, read through a small buffer (the page cache holds the file, this process does not). SHA-256
    /// runs in the platform's native library, so it costs about 90 ms for the 87 MiB weights even in a cold process;
    /// a managed non-cryptographic hash was tried and was slower there, its code not yet compiled with optimisation.
    /// </summary>
    private static string HashFile(string path)
    {
        using var stream = new FileStream(path, FileMode.Open, FileAccess.Read, FileShare.Read, 1 << 16, FileOptions.SequentialScan);
        return Convert.ToHexStringLower(SHA256.HashData(stream));
    }

    /// <summary>
    /// Writes the mapped form and its record into the model directory, replacing older ones (and removing an earlier
    /// form's files), after checking that the embeddings through it equal the source model's bit for bit on the
    /// project's phrase sets, one at a time and in batches. The files are made in a staging folder inside the
    /// directory and moved into place with the record last, so a reader never trusts a half-written set.
    /// </summary>
    /// <exception cref="InvalidDataException">The model does not load or parse, or the mapped form's embeddings differ (nothing is kept).</exception>
    public static OptimizedModelReport Write(string directory, ModelCard card, OnnxEmbedderOptions options)
    {
        string modelPath = Path.Combine(directory, "model.onnx");
        var source = new FileInfo(modelPath);
        long sourceLength = source.Length, sourceTicks = source.LastWriteTimeUtc.Ticks;
        var sourceOptions = options.Clone();
        sourceOptions.UseOptimizedModel = false;
        using var reference = OnnxEmbedder.CreateCore(directory, card, sourceOptions);

        string staging = Path.Combine(directory, $".prepare-{Environment.ProcessId}-{Guid.NewGuid():N}");
        Directory.CreateDirectory(staging);
        try
        {
            string graphPath = Path.Combine(staging, FileName), dataPath = Path.Combine(staging, DataFileName);
            int moved = Externalize(modelPath, graphPath, dataPath);
            var record = new OptimizedModelRecord
            {
                Format = Format,
                SourceSha256 = reference.Model.Sha256,
                SourceLength = sourceLength,
                SourceWriteTimeUtcTicks = sourceTicks,
                GraphLength = new FileInfo(graphPath).Length,
                GraphSha256 = HashFile(graphPath),
                DataLength = new FileInfo(dataPath).Length,
                DataSha256 = HashFile(dataPath),
                ExternalTensors = moved,
            };
            var phrases = Quantization.QuantizationPhrases.Calibration.Concat(Quantization.QuantizationPhrases.HeldOut).ToList();
            using (var candidate = OnnxEmbedder.CreateCore(directory, card, options, new Opened(graphPath, dataPath, record)))
            {
                if (!candidate.UsesOptimizedModel)
                    throw new InvalidDataException($"{modelPath}: ONNX Runtime did not load the mapped form ({candidate.OptimizedModelNote}); nothing was written. Start-up uses model.onnx.");
                int differing = CountDiffering(reference, candidate, phrases);
                if (differing > 0)
                    throw new InvalidDataException($"{modelPath}: the mapped form's embeddings differ from the source model's for {differing} of {phrases.Count * 2} embeddings (one at a time and batched); nothing was written. Start-up uses model.onnx.");
            }
            string recordPath = Path.Combine(staging, RecordFileName);
            File.WriteAllBytes(recordPath, JsonSerializer.SerializeToUtf8Bytes(record, RecordJson));
            // Record first out of the way, then the files, then the record: a reader in between finds no record or a
            // record whose hashes do not match, and uses model.onnx.
            File.Delete(Path.Combine(directory, RecordFileName));
            File.Move(dataPath, Path.Combine(directory, DataFileName), overwrite: true);
            File.Move(graphPath, Path.Combine(directory, FileName), overwrite: true);
            File.Move(recordPath, Path.Combine(directory, RecordFileName), overwrite: true);
            foreach (var legacy in Legacy) File.Delete(Path.Combine(directory, legacy));
            return new OptimizedModelReport(Path.Combine(directory, FileName), Path.Combine(directory, DataFileName), record.GraphLength + record.DataLength, moved, phrases.Count);
        }
        finally
        {
            try { Directory.Delete(staging, recursive: true); } catch (IOException) { } catch (UnauthorizedAccessException) { }
        }
    }

    /// <summary>
    /// Copies <paramref name="modelPath"/> to <paramref name="graphPath"/> with every initializer of at least
    /// <see cref="MinExternalBytes"/> raw bytes moved to <paramref name="dataPath"/> at an <see cref="Alignment"/>-aligned
    /// offset (ONNX external data: <c>location</c>, <c>offset</c>, <c>length</c>). Returns how many were moved.
    /// </summary>
    internal static int Externalize(string modelPath, string graphPath, string dataPath)
    {
        ModelProto model;
        try { model = ModelProto.Parser.ParseFrom(File.ReadAllBytes(modelPath)); }
        catch (InvalidProtocolBufferException e) { throw new InvalidDataException($"{modelPath}: not a readable ONNX model ({e.Message}).", e); }
        int moved = 0;
        using (var data = new FileStream(dataPath, FileMode.CreateNew, FileAccess.Write))
        {
            foreach (var tensor in model.Graph.Initializer)
            {
                if (tensor.DataLocation == TensorProto.Types.DataLocation.External || tensor.RawData.Length < MinExternalBytes) continue;
                long offset = (data.Length + Alignment - 1) / Alignment * Alignment;
                data.SetLength(offset);
                data.Position = offset;
                tensor.RawData.WriteTo(data);
                long length = tensor.RawData.Length;
                tensor.RawData = ByteString.Empty;
                tensor.DataLocation = TensorProto.Types.DataLocation.External;
                tensor.ExternalData.Clear();
                tensor.ExternalData.Add(new StringStringEntryProto { Key = "location", Value = DataFileName });
                tensor.ExternalData.Add(new StringStringEntryProto { Key = "offset", Value = offset.ToString(CultureInfo.InvariantCulture) });
                tensor.ExternalData.Add(new StringStringEntryProto { Key = "length", Value = length.ToString(CultureInfo.InvariantCulture) });
                moved++;
            }
        }
        File.WriteAllBytes(graphPath, model.ToByteArray());
        return moved;
    }

    /// <summary>Embeddings (single and batched) whose bits differ between the two embedders.</summary>
    internal static int CountDiffering(OnnxEmbedder a, OnnxEmbedder b, IReadOnlyList<string> phrases)
    {
        int differing = 0, dims = a.Model.Dimensions;
        var x = new float[dims];
        var y = new float[dims];
        foreach (string phrase in phrases)
        {
            a.Embed(phrase, x);
            b.Embed(phrase, y);
            if (!x.AsSpan().SequenceEqual(y)) differing++;
        }
        var (batchA, _) = a.EmbedMany(phrases);
        var (batchB, _) = b.EmbedMany(phrases);
        for (int i = 0; i < phrases.Count; i++)
            if (!batchA[i].AsSpan().SequenceEqual(batchB[i])) differing++;
        return differing;
    }

    private static readonly JsonSerializerOptions RecordJson = new() { WriteIndented = true, Encoder = System.Text.Encodings.Web.JavaScriptEncoder.UnsafeRelaxedJsonEscaping };
}

/// <summary>The record beside the mapped form (<c>model.mapped.json</c>).</summary>
internal sealed record OptimizedModelRecord
{
    [JsonPropertyName("format")] public int Format { get; init; }
    [JsonPropertyName("source_sha256")] public string SourceSha256 { get; init; } = "";
    [JsonPropertyName("source_length")] public long SourceLength { get; init; }
    [JsonPropertyName("source_write_time_utc_ticks")] public long SourceWriteTimeUtcTicks { get; init; }
    [JsonPropertyName("graph_length")] public long GraphLength { get; init; }
    [JsonPropertyName("graph_sha256")] public string GraphSha256 { get; init; } = "";
    [JsonPropertyName("data_length")] public long DataLength { get; init; }
    [JsonPropertyName("data_sha256")] public string DataSha256 { get; init; } = "";
    [JsonPropertyName("external_tensors")] public int ExternalTensors { get; init; }
}

/// <summary>What <see cref="OnnxEmbedder.PrepareOptimizedModel"/> wrote.</summary>
/// <param name="Path">The graph file (<c>model.mapped.onnx</c>).</param>
/// <param name="DataPath">The weights file it maps (<c>model.mapped.data</c>).</param>
/// <param name="Bytes">Both files' size together.</param>
/// <param name="ExternalTensors">Initializers moved to the weights file.</param>
/// <param name="ComparedPhrases">Phrases whose embeddings (one at a time and batched) were checked bit for bit against the source model.</param>
public sealed record OptimizedModelReport(string Path, string DataPath, long Bytes, int ExternalTensors, int ComparedPhrases);
