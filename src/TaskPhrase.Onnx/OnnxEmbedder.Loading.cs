using System.Security.Cryptography;
using Microsoft.Extensions.AI;
using Microsoft.ML.OnnxRuntime;
using TaskPhrase.Embedding;

namespace TaskPhrase.Onnx;

public sealed partial class OnnxEmbedder
{
    private OnnxEmbedder(string directory, ModelCard card, OnnxEmbedderOptions options, InferenceSession session,
        WordPieceTokenizer tokenizer, string outputName, bool needsTokenTypes, string sha256)
    {
        ModelDirectory = directory;
        _card = card;
        _options = options;
        _session = session;
        _tokenizer = tokenizer;
        _outputNames = [outputName];
        _needsTokenTypes = needsTokenTypes;
        Model = new EmbeddingModelInfo(card.Id, sha256, card.Dimensions, card.MaxTokens, card.Pooling);
        _metadata = new EmbeddingGeneratorMetadata("TaskPhrase.Onnx", new Uri("file://" + Path.GetFullPath(directory)), card.Id, card.Dimensions);
    }

    /// <summary>Loads the default built-in model (all-MiniLM-L6-v2).</summary>
    /// <exception cref="DirectoryNotFoundException">The built-in model's files are missing.</exception>
    /// <exception cref="InvalidDataException">The model files do not match their card or the expected contract.</exception>
    public static OnnxEmbedder CreateDefault(OnnxEmbedderOptions? options = null)
        => Create(BuiltInModels.Locate(BuiltInModels.MiniLmL6V2), options);

    /// <summary>
    /// Loads a model directory holding <c>model.onnx</c>, <c>vocab.txt</c> and <c>model.json</c> (the card),
    /// or a built-in model id. Checks the model's contract: inputs <c>input_ids</c> and <c>attention_mask</c>
    /// (int64, optional <c>token_type_ids</c>) and a float output of width <see cref="ModelCard.Dimensions"/>.
    /// </summary>
    /// <param name="directoryOrId">A directory, or one of <see cref="BuiltInModels.Ids"/>.</param>
    /// <param name="options">Runtime settings; null for the defaults.</param>
    /// <exception cref="DirectoryNotFoundException">The directory (or built-in model) does not exist.</exception>
    /// <exception cref="InvalidDataException">A file is missing, malformed, has the wrong SHA-256, or the model's inputs/outputs do not fit; or the card marks an int8 model whose quality figures are missing or fail <see cref="Quantization.QuantizationGates"/>. The message names the file and node.</exception>
    public static OnnxEmbedder Create(string directoryOrId, OnnxEmbedderOptions? options = null)
    {
        var (directory, card) = Locate(directoryOrId);
        return CreateCore(directory, card, options ?? new OnnxEmbedderOptions());
    }

    /// <summary>The model directory of a directory or built-in id, with its card, its files checked to exist.</summary>
    private static (string Directory, ModelCard Card) Locate(string directoryOrId)
    {
        ArgumentException.ThrowIfNullOrEmpty(directoryOrId);
        string directory = !Directory.Exists(directoryOrId) && BuiltInModels.Ids.Contains(directoryOrId)
            ? BuiltInModels.Locate(directoryOrId)
            : directoryOrId;
        if (!Directory.Exists(directory))
            throw new DirectoryNotFoundException($"Model directory '{directory}' does not exist. Pass a folder with model.onnx, vocab.txt and model.json, or a built-in id ({string.Join(", ", BuiltInModels.Ids)}).");
        string modelPath = Path.Combine(directory, "model.onnx");
        string vocabPath = Path.Combine(directory, "vocab.txt");
        foreach (var required in new[] { modelPath, vocabPath })
            if (!File.Exists(required)) throw new InvalidDataException($"{required}: missing. A model directory needs model.onnx, vocab.txt and model.json.");
        return (directory, ModelCard.Load(Path.Combine(directory, "model.json")));
    }

    /// <summary>Loads a model directory with an already validated card (the quantiser uses it before the card is written).</summary>
    internal static OnnxEmbedder CreateCore(string directory, ModelCard card, OnnxEmbedderOptions options)
    {
        OptimizedModel.Opened? opened = null;
        string note = "turned off (OnnxEmbedderOptions.UseOptimizedModel)";
        if (options.UseOptimizedModel) opened = OptimizedModel.TryOpen(directory, card, out note);
        return CreateCore(directory, card, options, opened, note);
    }

    /// <summary>
    /// Loads a model directory, from its mapped form when <paramref name="opened"/> is given (falling back to
    /// model.onnx when those files do not match their record or ONNX Runtime refuses them), else from model.onnx.
    /// </summary>
    internal static OnnxEmbedder CreateCore(string directory, ModelCard card, OnnxEmbedderOptions options, OptimizedModel.Opened? opened, string note = "")
    {
        string modelPath = Path.Combine(directory, "model.onnx");
        string vocabPath = Path.Combine(directory, "vocab.txt");
        // Beside session creation (the longest step of a cold start): read the vocabulary, and hash model.onnx, or check
        // the mapped form's files against their record (which carries the source's hash; empty result = they match).
        var hashing = opened is null
            ? Task.Run(() => { using var s = File.OpenRead(modelPath); return Convert.ToHexStringLower(SHA256.HashData(s)); })
            : null;
        var verifying = opened is null ? null : Task.Run(() => OptimizedModel.Verify(opened));
        var tokenizing = Task.Run(() => new WordPieceTokenizer(vocabPath, card.Lowercase));
        InferenceSession session;
        using (var sessionOptions = SessionOptionsFor(card, options))
        {
            try
            {
                session = new InferenceSession(opened?.GraphPath ?? modelPath, sessionOptions);
            }
            catch (OnnxRuntimeException e) when (opened is not null)
            {
                tokenizing.GetAwaiter().GetResult();
                verifying?.GetAwaiter().GetResult();
                return CreateCore(directory, card, options, null, $"ONNX Runtime refused {OptimizedModel.FileName} ({e.Message})");
            }
            catch (Exception e)
            {
                // A broken vocabulary is reported before a broken model, as when they were read one after the other.
                tokenizing.GetAwaiter().GetResult();
                if (e is OnnxRuntimeException) throw new InvalidDataException($"{modelPath}: ONNX Runtime could not load the model ({e.Message}).", e);
                throw;
            }
        }

        try
        {
            var tokenizer = tokenizing.GetAwaiter().GetResult();
            var (outputName, needsTypes) = CheckContract(session, modelPath, card);
            string sha;
            if (opened is null) sha = hashing!.GetAwaiter().GetResult();
            else
            {
                string mismatch = verifying!.GetAwaiter().GetResult();
                if (mismatch.Length > 0)
                {
                    session.Dispose();
                    return CreateCore(directory, card, options, null, mismatch);
                }
                sha = opened.Record.SourceSha256;
            }
            if (options.VerifyModelHash && card.ModelSha256 is { Length: > 0 } expected && !string.Equals(expected, sha, StringComparison.OrdinalIgnoreCase))
                throw new InvalidDataException($"{modelPath}: SHA-256 is {sha} but the model card records {expected}. The file was changed or corrupted; restore it (rebuild extracts the built-in models again).");
            return new OnnxEmbedder(directory, card, options, session, tokenizer, outputName, needsTypes, sha)
            {
                UsesOptimizedModel = opened is not null,
                OptimizedModelNote = opened is null ? note : "",
            };
        }
        catch
        {
            session.Dispose();
            throw;
        }
    }

    /// <summary>The session settings every load uses (and <see cref="OptimizedModel.Write"/> saves the graph with).</summary>
    internal static SessionOptions SessionOptionsFor(ModelCard card, OnnxEmbedderOptions options)
    {
        var sessionOptions = new SessionOptions
        {
            GraphOptimizationLevel = GraphOptimizationLevel.ORT_ENABLE_ALL,
            ExecutionMode = ExecutionMode.ORT_SEQUENTIAL,
            IntraOpNumThreads = card.IsQuantized && options.QuantizedIntraOpThreads > 0 ? options.QuantizedIntraOpThreads : options.IntraOpThreads,
            InterOpNumThreads = 1,
        };
        sessionOptions.AddSessionConfigEntry("session.intra_op.allow_spinning", options.AllowSpinning ? "1" : "0");
        // Without VNNI, x64 int8 kernels can saturate the u8×s8 pair products; this setting avoids that. With VNNI it
        // only costs speed (measured about half), so it is set only where VNNI is missing.
        if (card.IsQuantized && NeedsX64QuantPrecision) sessionOptions.AddSessionConfigEntry("session.x64quantprecision", "1");
        options.ConfigureSession?.Invoke(sessionOptions);
        return sessionOptions;
    }

    /// <summary>
    /// Writes the mapped form of a model directory (<c>model.mapped.onnx</c>, the graph, and <c>model.mapped.data</c>,
    /// its large weights at page-aligned offsets, with the record <c>model.mapped.json</c>) so that later loads map the
    /// weights into memory instead of copying them: a shorter cold start and a lower peak memory, with embeddings the
    /// same bit for bit (checked before the files are kept). Later loads use it unless
    /// <see cref="OnnxEmbedderOptions.UseOptimizedModel"/> is off, and ignore it when it no longer fits model.onnx.
    /// </summary>
    /// <param name="directoryOrId">A model directory or built-in id; it must be writable.</param>
    /// <param name="options">Runtime settings (thread counts do not matter); null for the defaults.</param>
    /// <exception cref="DirectoryNotFoundException">The directory (or built-in model) does not exist.</exception>
    /// <exception cref="InvalidDataException">The model does not load, or the optimised file's embeddings differ from the source's (nothing is written).</exception>
    /// <exception cref="UnauthorizedAccessException">The directory is not writable.</exception>
    public static OptimizedModelReport PrepareOptimizedModel(string directoryOrId, OnnxEmbedderOptions? options = null)
    {
        var (directory, card) = Locate(directoryOrId);
        return OptimizedModel.Write(directory, card, options ?? new OnnxEmbedderOptions());
    }

    /// <summary>True on x64 CPUs without AVX-VNNI or AVX-512 VNNI (the int8 dot-product instructions).</summary>
    internal static bool NeedsX64QuantPrecision =>
        System.Runtime.InteropServices.RuntimeInformation.ProcessArchitecture == System.Runtime.InteropServices.Architecture.X64
        && !HasVnni();

    /// <summary>
    /// AVX-VNNI (.NET reports it), or AVX-512 VNNI: .NET 10 has no class for the latter, so read CPUID leaf 7 (ECX bit 11,
    /// Intel SDM vol. 2, CPUID) and require that the OS enabled AVX-512 (<c>Avx512F.IsSupported</c>).
    /// </summary>
    internal static bool HasVnni()
    {
        if (System.Runtime.Intrinsics.X86.AvxVnni.IsSupported || System.Runtime.Intrinsics.X86.Avx10v1.IsSupported) return true;
        if (!System.Runtime.Intrinsics.X86.X86Base.IsSupported || !System.Runtime.Intrinsics.X86.Avx512F.IsSupported) return false;
        var (_, _, ecx, _) = System.Runtime.Intrinsics.X86.X86Base.CpuId(7, 0);
        return (ecx & (1 << 11)) != 0;
    }

    private static (string OutputName, bool NeedsTokenTypes) CheckContract(InferenceSession session, string modelPath, ModelCard card)
    {
        var inputs = session.InputMetadata;
        foreach (var name in InputNames)
        {
            if (!inputs.TryGetValue(name, out var meta))
                throw new InvalidDataException($"{modelPath}: model has no input node '{name}' (inputs: {string.Join(", ", inputs.Keys)}); expected a BERT-style encoder with input_ids and attention_mask.");
            if (meta.ElementType != typeof(long))
                throw new InvalidDataException($"{modelPath}: input node '{name}' has element type {meta.ElementType.Name}; expected Int64.");
        }
        var unknown = inputs.Keys.Except(InputNamesWithTypes).ToList();
        if (unknown.Count > 0)
            throw new InvalidDataException($"{modelPath}: model needs inputs this embedder cannot supply: {string.Join(", ", unknown)}.");
        bool needsTypes = inputs.ContainsKey("token_type_ids");

        var outputs = session.OutputMetadata;
        string outputName = outputs.ContainsKey("last_hidden_state")
            ? "last_hidden_state"
            : outputs.FirstOrDefault(o => o.Value.Dimensions.Length == 3).Key
              ?? throw new InvalidDataException($"{modelPath}: no output node of rank 3 [batch, tokens, dimensions] (outputs: {string.Join(", ", outputs.Keys)}).");
        var output = outputs[outputName];
        if (output.ElementType != typeof(float))
            throw new InvalidDataException($"{modelPath}: output node '{outputName}' has element type {output.ElementType.Name}; expected Single.");
        int width = output.Dimensions[^1];
        if (width > 0 && width != card.Dimensions)
            throw new InvalidDataException($"{modelPath}: output node '{outputName}' has width {width} but the model card says {card.Dimensions} dimensions.");
        return (outputName, needsTypes);
    }
}
