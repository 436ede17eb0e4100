using System.Security.Cryptography;
using System.Text.Json;
using Onnx;

namespace TaskPhrase.Onnx.Quantization;

/// <summary>
/// Writes an int8 variant of a model directory: SmoothQuant-style scale migration (Xiao et al. 2023, "SmoothQuant")
/// calibrated on the project's own command phrases, then per-column symmetric int8 weights for every MatMul with a
/// constant weight, run as standard ONNX ops (<c>DynamicQuantizeLinear</c>, <c>MatMulInteger</c>, <c>Cast</c>,
/// <c>Mul</c>) that ONNX Runtime fuses; the wide feed-forward down-projections quantise their input per token
/// (<c>ReduceMax</c>/<c>ReduceMin</c>, per-row <c>QuantizeLinear</c>) and keep their few outlier input channels in fp32
/// (<c>Gather</c>, a small fp32 <c>MatMul</c>, <c>Add</c>; the mixed-precision decomposition of LLM.int8(), Dettmers et al. 2022). The result is measured against the fp32 model and written only when it passes
/// <see cref="QuantizationGates"/>. Deterministic: the same source and options give byte-identical files.
/// </summary>
/// <remarks>Thread-safe: no shared state; each call loads its own sessions.</remarks>
public static partial class ModelQuantizer
{
    /// <summary>The method name recorded in the card.</summary>
    public const string Method = "smoothquant-int8-per-column-per-token-wide-fp32-outliers";

    /// <summary>
    /// Quantises the model in <paramref name="sourceDirectory"/> and, when the gates pass, writes <c>model.onnx</c>,
    /// a copy of <c>vocab.txt</c> and <c>model.json</c> to <paramref name="outputDirectory"/> (created if needed;
    /// those three files are replaced). When a gate fails nothing is written and the result says why.
    /// </summary>
    /// <param name="sourceDirectory">An fp32 model directory (model.onnx, vocab.txt, model.json) or a built-in id.</param>
    /// <param name="outputDirectory">Where to write the int8 model directory; must differ from the source.</param>
    /// <param name="options">Settings; null for the defaults (α = 0.7).</param>
    /// <param name="cancellationToken">Checked between phrases and MatMuls.</param>
    /// <exception cref="DirectoryNotFoundException">The source directory does not exist.</exception>
    /// <exception cref="InvalidDataException">The source is unreadable, already quantised, or not a BERT-style encoder; the message names the file.</exception>
    /// <exception cref="ArgumentException">The output directory is the source directory.</exception>
    /// <exception cref="IOException">The output cannot be written.</exception>
    /// <exception cref="FileNotFoundException"><see cref="QuantizationOptions.Clinc150Path"/> is set but the file is not there.</exception>
    public static QuantizationResult Quantize(string sourceDirectory, string outputDirectory, QuantizationOptions? options = null,
        CancellationToken cancellationToken = default)
    {
        ArgumentException.ThrowIfNullOrEmpty(sourceDirectory);
        ArgumentException.ThrowIfNullOrEmpty(outputDirectory);
        options ??= new QuantizationOptions();

        using var source = OnnxEmbedder.Create(sourceDirectory, options.EmbedderOptions);
        string sourceDir = Path.GetFullPath(source.ModelDirectory);
        string outputDir = Path.GetFullPath(outputDirectory);
        if (string.Equals(sourceDir.TrimEnd(Path.DirectorySeparatorChar), outputDir.TrimEnd(Path.DirectorySeparatorChar), StringComparison.Ordinal))
            throw new ArgumentException($"The output directory {outputDir} is the source model's directory; choose another.", nameof(outputDirectory));
        string modelPath = Path.Combine(sourceDir, "model.onnx");
        var sourceCard = ModelCard.Load(Path.Combine(sourceDir, "model.json"));
        if (sourceCard.IsQuantized)
            throw new InvalidDataException($"{Path.Combine(sourceDir, "model.json")}: this model is already quantised ({sourceCard.Quantization!.Method}); quantise its fp32 source instead.");

        string? clinc = options.Clinc150Path is { } given ? Clinc150Audit.Locate(given) : null;

        // Stage beside the output (so the final moves stay on one volume) before the long work, so that an output
        // that cannot be written fails at once; evaluate there; publish only on success.
        string staging = CreateStaging(outputDir, "the int8 model");
        try
        {
            return QuantizeInto(staging, source, sourceDir, sourceCard, modelPath, outputDir, options, clinc, cancellationToken);
        }
        finally
        {
            if (Directory.Exists(staging)) Directory.Delete(staging, recursive: true);
        }
    }

    private static QuantizationResult QuantizeInto(string staging, OnnxEmbedder source, string sourceDir, ModelCard sourceCard,
        string modelPath, string outputDir, QuantizationOptions options, string? clinc, CancellationToken cancellationToken)
    {
        ModelProto model;
        try
        {
            model = ModelProto.Parser.ParseFrom(File.ReadAllBytes(modelPath));
        }
        catch (Google.Protobuf.InvalidProtocolBufferException e)
        {
            throw new InvalidDataException($"{modelPath}: not a readable ONNX model ({e.Message}).", e);
        }

        var plan = FindQuantizableMatMuls(model.Graph, modelPath);
        var calibration = options.CalibrationPhrases ?? QuantizationPhrases.Calibration;
        var maxima = CalibrateActivationMaxima(model, plan, source, calibration, cancellationToken);
        int rewritten = Rewrite(model, plan, maxima, options.Alpha, cancellationToken, options.Variant?.Plan);
        string method = options.Variant is { Name: var variant } ? Method + "+" + variant : Method;
        byte[] bytes = Google.Protobuf.MessageExtensions.ToByteArray(model);
        string sha = Convert.ToHexStringLower(SHA256.HashData(bytes));

        var info = new ModelQuantizationInfo
        {
            Method = method,
            Alpha = options.Alpha,
            CalibrationPhrases = calibration.Count,
            CalibrationSetSha256 = QuantizationPhrases.Sha256(calibration),
            SourceModelId = sourceCard.Id,
            SourceModelSha256 = source.Model.Sha256,
            QuantizedMatMuls = rewritten,
        };
        var card = new ModelCard
        {
            Id = options.Id ?? sourceCard.Id + "-int8",
            Pooling = sourceCard.Pooling,
            MaxTokens = sourceCard.MaxTokens,
            Dimensions = sourceCard.Dimensions,
            Lowercase = sourceCard.Lowercase,
            ModelSha256 = sha,
            VocabSha256 = sourceCard.VocabSha256,
            Licence = sourceCard.Licence,
            Source = $"int8 ({method}, alpha {options.Alpha.ToString(System.Globalization.CultureInfo.InvariantCulture)}) of {sourceCard.Id}: {sourceCard.Source}",
            Quantization = info,
            // A layer-pooled source stays layer-pooled: the int8 graph keeps its Concat.
            Layers = sourceCard.Layers,
        };

        try
        {
            File.WriteAllBytes(Path.Combine(staging, "model.onnx"), bytes);
            File.Copy(Path.Combine(sourceDir, "vocab.txt"), Path.Combine(staging, "vocab.txt"));
            QuantizationQuality quality;
            using (var quantized = OnnxEmbedder.CreateCore(staging, card, options.EmbedderOptions))
            {
                quality = Measure(source, quantized, cancellationToken);
                if (clinc is not null) quality = quality with { Clinc150 = Clinc150Audit.Measure(clinc, source, quantized, cancellationToken) };
            }
            card = card with { Quantization = info with { Quality = quality } };
            string? failure = QuantizationGates.Check(quality, sourceCard.Id);
            if (failure is not null) return new QuantizationResult(false, outputDir, card, failure);

            File.WriteAllBytes(Path.Combine(staging, "model.json"), SerializeCard(card));
            Directory.CreateDirectory(outputDir);
            foreach (var name in new[] { "model.onnx", "vocab.txt", "model.json" })
                File.Move(Path.Combine(staging, name), Path.Combine(outputDir, name), overwrite: true);
            return new QuantizationResult(true, outputDir, card, null);
        }
        catch (UnauthorizedAccessException e)
        {
            throw new IOException($"{outputDir}: cannot write the int8 model there ({e.Message}); choose a writable --output directory.", e);
        }
    }

    /// <summary>
    /// Checks that <paramref name="outputDir"/> can be a directory and creates a fresh staging directory beside it;
    /// <paramref name="what"/> names the model in messages ("the int8 model").
    /// </summary>
    internal static string CreateStaging(string outputDir, string what)
    {
        string trimmed = outputDir.TrimEnd(Path.DirectorySeparatorChar);
        if (File.Exists(trimmed))
            throw new IOException($"{outputDir}: is a file; {what} is a directory (model.onnx, vocab.txt, model.json). Give a new or existing directory as the output.");
        string parent = Path.GetDirectoryName(trimmed) ?? outputDir;
        string staging = Path.Combine(parent, "." + Path.GetFileName(trimmed) + ".partial-" + Environment.ProcessId);
        try
        {
            Directory.CreateDirectory(parent);
            if (Directory.Exists(staging)) Directory.Delete(staging, recursive: true);
            Directory.CreateDirectory(staging);
        }
        catch (Exception e) when (e is IOException or UnauthorizedAccessException)
        {
            throw new IOException($"{outputDir}: cannot create the output directory there ({e.Message}); choose a writable --output directory.", e);
        }
        return staging;
    }

    /// <summary>The card as written: indented UTF-8 JSON with a final line feed.</summary>
    internal static byte[] SerializeCard(ModelCard card) => [.. JsonSerializer.SerializeToUtf8Bytes(card, CardJson), (byte)'\n'];

    private static readonly JsonSerializerOptions CardJson = new()
    {
        WriteIndented = true,
        DefaultIgnoreCondition = System.Text.Json.Serialization.JsonIgnoreCondition.WhenWritingNull,
        Encoder = System.Text.Encodings.Web.JavaScriptEncoder.UnsafeRelaxedJsonEscaping,
    };
}
