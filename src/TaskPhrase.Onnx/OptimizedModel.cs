using System.Runtime.InteropServices;
using System.Runtime.Intrinsics.X86;
using System.Security.Cryptography;
using System.Text.Json;
using System.Text.Json.Serialization;
using Microsoft.ML.OnnxRuntime;

namespace TaskPhrase.Onnx;

/// <summary>
/// The pre-optimised form of a model directory's <c>model.onnx</c>: ONNX Runtime's own graph after its
/// optimisations (<c>ORT_ENABLE_ALL</c>), saved in the ORT format as <c>model.ort</c>, with a record
/// (<c>model.ort.json</c>) of what it was made from and where it is valid. Loading it skips the graph optimisation
/// at start-up (session creation about 0.36 s → 0.25 s on the benchmark machine, docs/benchmarks.md) and gives
/// bit-identical outputs: <see cref="Write"/> refuses to keep a file whose embeddings differ from the source model's
/// in any bit. The saved graph may hold CPU-specific choices (ONNX Runtime warns so at the optimisation level used),
/// so the record names the ONNX Runtime version and the CPU's instruction-set extensions, and a file made for other
/// ones is ignored. The source's identity (SHA-256) stays the model's identity: an index built either way matches.
/// </summary>
internal static class OptimizedModel
{
    /// <summary>The pre-optimised model file, beside model.onnx.</summary>
    public const string FileName = "model.ort";

    /// <summary>The record of how and for what the file was made, beside model.onnx.</summary>
    public const string RecordFileName = "model.ort.json";

    /// <summary>Bumped when the record or the way the file is made changes; other formats are ignored.</summary>
    public const int Format = 1;

    /// <summary>What <see cref="TryOpen"/> found: the file's bytes (pinned: ONNX Runtime reads them in place) and its record.</summary>
    internal sealed record Opened(byte[] Bytes, OptimizedModelRecord Record);

    /// <summary>ONNX Runtime's native version string.</summary>
    public static string RuntimeVersion => OrtEnv.Instance().GetVersionString();

    /// <summary>
    /// The processor architecture and the instruction-set extensions that ONNX Runtime's CPU kernels and graph
    /// transformers choose by (x64: AVX, AVX2, FMA, AVX-512 F/BW/VL/DQ, VNNI; Arm64: AdvSIMD, dot product).
    /// </summary>
    public static string CpuSignature
    {
        get
        {
            var parts = new List<string> { RuntimeInformation.ProcessArchitecture.ToString().ToLowerInvariant() };
            void Add(bool supported, string name) { if (supported) parts.Add(name); }
            Add(Avx.IsSupported, "avx");
            Add(Avx2.IsSupported, "avx2");
            Add(Fma.IsSupported, "fma");
            Add(Avx512F.IsSupported, "avx512f");
            Add(Avx512BW.IsSupported, "avx512bw");
            Add(Avx512DQ.IsSupported, "avx512dq");
            Add(Avx512F.VL.IsSupported, "avx512vl");
            Add(OnnxEmbedder.HasVnni(), "vnni");
            Add(System.Runtime.Intrinsics.Arm.AdvSimd.IsSupported, "advsimd");
            Add(System.Runtime.Intrinsics.Arm.Dp.IsSupported, "dotprod");
            return string.Join('+', parts);
        }
    }

    /// <summary>The session settings that change the optimised graph or its kernels (the thread count does neither).</summary>
    public static string SessionKey(ModelCard card)
        => "level=all;x64quantprecision=" + (card.IsQuantized && OnnxEmbedder.NeedsX64QuantPrecision ? "1" : "0");

    /// <summary>
    /// The pre-optimised file of <paramref name="directory"/> when its record is readable and fits this source model,
    /// card, ONNX Runtime and CPU; otherwise null with the reason in <paramref name="whyNot"/> (no file is a reason too).
    /// The file's bytes are read into a pinned array; their SHA-256 is <em>not</em> checked here (the caller hashes
    /// them beside session creation and compares with <see cref="OptimizedModelRecord.Sha256"/>).
    /// </summary>
    public static Opened? TryOpen(string directory, ModelCard card, out string whyNot)
    {
        string recordPath = Path.Combine(directory, RecordFileName), filePath = Path.Combine(directory, FileName);
        if (!File.Exists(recordPath) || !File.Exists(filePath))
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
        whyNot = record switch
        {
            null => $"{recordPath} is empty",
            { Format: not Format } => $"{recordPath} has format {record.Format}, this version reads {Format}",
            _ when record.SourceLength != source.Length || record.SourceWriteTimeUtcTicks != source.LastWriteTimeUtc.Ticks
                => "model.onnx changed after model.ort was written",
            _ when card.ModelSha256 is { Length: > 0 } expected && !string.Equals(expected, record.SourceSha256, StringComparison.OrdinalIgnoreCase)
                => $"model.ort was made from a model with SHA-256 {record.SourceSha256}, the card records {card.ModelSha256}",
            _ when record.Runtime != RuntimeVersion => $"model.ort was made by ONNX Runtime {record.Runtime}, this is {RuntimeVersion}",
            _ when record.Cpu != CpuSignature => $"model.ort was made on a CPU with {record.Cpu}, this one has {CpuSignature}",
            _ when record.Session != SessionKey(card) => $"model.ort was made with session settings {record.Session}, these are {SessionKey(card)}",
            _ => "",
        };
        if (whyNot.Length > 0) return null;
        try
        {
            using var handle = File.OpenHandle(filePath, FileMode.Open, FileAccess.Read, FileShare.Read, FileOptions.SequentialScan);
            long length = RandomAccess.GetLength(handle);
            if (length != record!.Length || length > int.MaxValue)
            {
                whyNot = $"{filePath} has {length} bytes, its record says {record.Length}";
                return null;
            }
            // Pinned: ONNX Runtime keeps pointers into these bytes for the session's lifetime.
            var bytes = GC.AllocateUninitializedArray<byte>((int)length, pinned: true);
            for (int read = 0, n; read < bytes.Length; read += n)
            {
                n = RandomAccess.Read(handle, bytes.AsSpan(read), read);
                if (n == 0) { whyNot = $"{filePath} ended early"; return null; }
            }
            return new Opened(bytes, record);
        }
        catch (Exception e) when (e is IOException or UnauthorizedAccessException)
        {
            whyNot = $"{filePath} is unreadable ({e.Message})";
            return null;
        }
    }

    /// <summary>Session options that read an ORT-format model in place from the bytes given to the session.</summary>
    public static void UseBytesInPlace(SessionOptions options)
    {
        options.AddSessionConfigEntry("session.load_model_format", "ORT");
        options.AddSessionConfigEntry("session.use_ort_model_bytes_directly", "1");
        options.AddSessionConfigEntry("session.use_ort_model_bytes_for_initializers", "1");
    }

    /// <summary>
    /// Writes <c>model.ort</c> and its record into the model directory, replacing older ones, after checking that the
    /// embeddings through it equal the source model's bit for bit on the project's phrase sets, one at a time and in
    /// batches. The record is written last (by rename), so a reader never sees a half-written pair.
    /// </summary>
    /// <exception cref="InvalidDataException">The model does not load, or the optimised file's embeddings differ (nothing is kept).</exception>
    public static OptimizedModelReport Write(string directory, ModelCard card, OnnxEmbedderOptions options)
    {
        string modelPath = Path.Combine(directory, "model.onnx");
        string filePath = Path.Combine(directory, FileName), recordPath = Path.Combine(directory, RecordFileName);
        string stamp = $".{Environment.ProcessId}.{Guid.NewGuid():N}.tmp";
        string tmpFile = filePath + stamp, tmpRecord = recordPath + stamp;
        var source = new FileInfo(modelPath);
        long sourceLength = source.Length, sourceTicks = source.LastWriteTimeUtc.Ticks;
        try
        {
            using (var sessionOptions = OnnxEmbedder.SessionOptionsFor(card, options))
            {
                sessionOptions.AddSessionConfigEntry("session.save_model_format", "ORT");
                // ONNX Runtime warns that the saved graph may be CPU-specific; the record's CPU signature handles that.
                sessionOptions.LogSeverityLevel = OrtLoggingLevel.ORT_LOGGING_LEVEL_ERROR;
                sessionOptions.OptimizedModelFilePath = tmpFile;
                try { using var saving = new InferenceSession(modelPath, sessionOptions); }
                catch (OnnxRuntimeException e) { throw new InvalidDataException($"{modelPath}: ONNX Runtime could not load the model ({e.Message}).", e); }
            }
            var sourceOptions = options.Clone();
            sourceOptions.UseOptimizedModel = false;
            using var reference = OnnxEmbedder.CreateCore(directory, card, sourceOptions);
            byte[] bytes = File.ReadAllBytes(tmpFile);
            var record = new OptimizedModelRecord
            {
                Format = Format,
                SourceSha256 = reference.Model.Sha256,
                SourceLength = sourceLength,
                SourceWriteTimeUtcTicks = sourceTicks,
                Runtime = RuntimeVersion,
                Cpu = CpuSignature,
                Session = SessionKey(card),
                Length = bytes.Length,
                Sha256 = Convert.ToHexStringLower(SHA256.HashData(bytes)),
            };
            var pinned = GC.AllocateUninitializedArray<byte>(bytes.Length, pinned: true);
            bytes.CopyTo(pinned, 0);
            using var candidate = OnnxEmbedder.CreateCore(directory, card, options, new Opened(pinned, record));
            var phrases = Quantization.QuantizationPhrases.Calibration.Concat(Quantization.QuantizationPhrases.HeldOut).ToList();
            int differing = CountDiffering(reference, candidate, phrases);
            if (differing > 0)
                throw new InvalidDataException($"{modelPath}: the pre-optimised model's embeddings differ from the source model's for {differing} of {phrases.Count * 2} embeddings (one at a time and batched); nothing was written. Start-up uses model.onnx.");
            File.WriteAllBytes(tmpRecord, JsonSerializer.SerializeToUtf8Bytes(record, RecordJson));
            File.Move(tmpFile, filePath, overwrite: true);
            File.Move(tmpRecord, recordPath, overwrite: true);
            return new OptimizedModelReport(filePath, record.Length, phrases.Count, record.Runtime, record.Cpu);
        }
        finally
        {
            foreach (var tmp in new[] { tmpFile, tmpRecord })
                try { File.Delete(tmp); } catch (IOException) { } catch (UnauthorizedAccessException) { }
        }
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

/// <summary>The record beside a pre-optimised model file (<c>model.ort.json</c>).</summary>
internal sealed record OptimizedModelRecord
{
    [JsonPropertyName("format")] public int Format { get; init; }
    [JsonPropertyName("source_sha256")] public string SourceSha256 { get; init; } = "";
    [JsonPropertyName("source_length")] public long SourceLength { get; init; }
    [JsonPropertyName("source_write_time_utc_ticks")] public long SourceWriteTimeUtcTicks { get; init; }
    [JsonPropertyName("onnx_runtime")] public string Runtime { get; init; } = "";
    [JsonPropertyName("cpu")] public string Cpu { get; init; } = "";
    [JsonPropertyName("session")] public string Session { get; init; } = "";
    [JsonPropertyName("length")] public long Length { get; init; }
    [JsonPropertyName("sha256")] public string Sha256 { get; init; } = "";
}

/// <summary>What <see cref="OnnxEmbedder.PrepareOptimizedModel"/> wrote.</summary>
/// <param name="Path">The pre-optimised model file (<c>model.ort</c>).</param>
/// <param name="Bytes">Its size.</param>
/// <param name="ComparedPhrases">Phrases whose embeddings (one at a time and batched) were checked bit for bit against the source model.</param>
/// <param name="Runtime">The ONNX Runtime version it is valid for.</param>
/// <param name="Cpu">The CPU signature it is valid for.</param>
public sealed record OptimizedModelReport(string Path, long Bytes, int ComparedPhrases, string Runtime, string Cpu);
