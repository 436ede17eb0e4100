using System.Buffers.Binary;
using System.Runtime.InteropServices;
using System.Security.Cryptography;
using System.Text;
using System.Text.Json;
using TaskPhrase.Embedding;

namespace TaskPhrase.Registry;

public sealed partial class TaskIndex
{
    private const string Rebuild = "rebuild it with 'taskphrase build'";

    /// <summary>
    /// Loads and checks an index file: magic and version, the whole-file SHA-256, every offset and length against
    /// the file size, each block's and section's SHA-256, that the stored registry hash equals the hash of the stored
    /// canonical JSON, and (when <paramref name="expectedModel"/> is given) that the model id and SHA-256 match.
    /// </summary>
    /// <param name="path">The index file.</param>
    /// <param name="expectedModel">The model in use; null skips the model check.</param>
    /// <exception cref="ArgumentException"><paramref name="path"/> is null or empty.</exception>
    /// <exception cref="IndexException">Any check failed; <see cref="IndexException.Kind"/> says which kind.</exception>
    public static TaskIndex Load(string path, EmbeddingModelInfo? expectedModel = null)
        => Load(path, expectedModel, expectedRegistryHash: null);

    /// <summary>
    /// Like <see cref="Load(string, EmbeddingModelInfo?)"/>, and also checks that the index was built from the registry
    /// with content hash <paramref name="expectedRegistryHash"/> (e.g. the registry file now in use).
    /// </summary>
    /// <param name="path">The index file.</param>
    /// <param name="expectedModel">The model in use; null skips the model check.</param>
    /// <param name="expectedRegistryHash">The expected <see cref="TaskRegistry.ContentHash"/>; null skips the check.</param>
    /// <exception cref="ArgumentException"><paramref name="path"/> is null or empty.</exception>
    /// <exception cref="IndexException">Any check failed; <see cref="IndexException.Kind"/> says which kind.</exception>
    public static TaskIndex Load(string path, EmbeddingModelInfo? expectedModel, string? expectedRegistryHash)
    {
        ArgumentException.ThrowIfNullOrEmpty(path);
        byte[] file = ReadFile(path);
        var index = Parse(file, path);
        if (expectedRegistryHash is not null && !string.Equals(index.RegistryHash, expectedRegistryHash, StringComparison.OrdinalIgnoreCase))
        {
            throw new IndexException(IndexErrorKind.RegistryMismatch, path,
                $"Index {path} was built from registry {index.RegistryHash}, but registry {expectedRegistryHash.ToLowerInvariant()} is in use; {Rebuild} from the current registry.");
        }
        if (expectedModel is not null) index.EnsureModel(expectedModel);
        return index;
    }

    /// <summary>
    /// Checks that this index was built with <paramref name="model"/> (same id, SHA-256 and dimensions), as
    /// <see cref="Load(string, EmbeddingModelInfo?)"/> does when given the model; for callers that load the index
    /// before the model is ready.
    /// </summary>
    /// <exception cref="IndexException">The models differ (<see cref="IndexErrorKind.ModelMismatch"/>).</exception>
    public void EnsureModel(EmbeddingModelInfo model)
    {
        ArgumentNullException.ThrowIfNull(model);
        if (!string.Equals(Model.Id, model.Id, StringComparison.Ordinal)
            || !string.Equals(Model.Sha256, model.Sha256, StringComparison.OrdinalIgnoreCase)
            || Model.Dimensions != model.Dimensions)
        {
            string path = SourcePath ?? "(index in memory)";
            throw new IndexException(IndexErrorKind.ModelMismatch, path,
                $"Index {path} was built with model {Model.Id} (SHA-256 {Model.Sha256}, {Model.Dimensions} dimensions), but the model in use is {model.Id} (SHA-256 {model.Sha256.ToLowerInvariant()}, {model.Dimensions} dimensions); {Rebuild} with this model, or use the model it was built with.");
        }
    }

    private static byte[] ReadFile(string path)
    {
        try
        {
            var info = new FileInfo(path);
            if (!info.Exists)
                throw new IndexException(IndexErrorKind.NotFound, path, $"Index {path} does not exist; check the path or build it with 'taskphrase build'.");
            if (info.Length > MaxFileBytes)
                throw new IndexException(IndexErrorKind.NotAnIndex, path,
                    $"Index {path} is {info.Length:N0} bytes, over the limit of {MaxFileBytes:N0}; check that this is an index file.");
            return File.ReadAllBytes(path);
        }
        catch (Exception ex) when (ex is IOException or UnauthorizedAccessException or NotSupportedException or ArgumentException)
        {
            throw new IndexException(IndexErrorKind.Unreadable, path, $"Index {path} cannot be read ({ex.Message}); check the path and permissions.", ex);
        }
    }

    internal static TaskIndex Parse(byte[] file, string path)
    {
        IndexException Corrupt(string what) => new(IndexErrorKind.Corrupt, path, $"Index {path} is damaged: {what}; {Rebuild}.");

        if (file.Length == 0)
            throw new IndexException(IndexErrorKind.Corrupt, path, $"Index {path} is empty (0 bytes): the write was interrupted or the file was truncated; {Rebuild}.");
        if (file.Length < Magic.Length || !file.AsSpan(0, Magic.Length).SequenceEqual(Magic))
        {
            string hint = LooksLikeText(file) ? " (it looks like text: a registry YAML? Build an index from it with 'taskphrase build')" : "";
            throw new IndexException(IndexErrorKind.NotAnIndex, path, $"{path} is not a TaskPhrase index: its first bytes are not the index magic{hint}.");
        }
        if (file.Length < PreambleLength + ChecksumLength)
            throw Corrupt($"the file is only {file.Length} bytes, too short for an index (truncated?)");
        uint version = BinaryPrimitives.ReadUInt32LittleEndian(file.AsSpan(8));
        if (version != FormatVersion)
        {
            throw new IndexException(IndexErrorKind.UnsupportedVersion, path,
                $"Index {path} has format version {version}, but this TaskPhrase reads version {FormatVersion}; {Rebuild} using this TaskPhrase, or use the release that wrote it.");
        }
        uint headerLength = BinaryPrimitives.ReadUInt32LittleEndian(file.AsSpan(12));
        if (headerLength == 0 || headerLength > MaxHeaderBytes || PreambleLength + (long)headerLength + ChecksumLength > file.Length)
            throw Corrupt($"the header length {headerLength} does not fit in the file of {file.Length} bytes (truncated?)");

        int bodyLength = file.Length - ChecksumLength;
        Span<byte> actual = stackalloc byte[ChecksumLength];
        SHA256.HashData(file.AsSpan(0, bodyLength), actual);
        if (!actual.SequenceEqual(file.AsSpan(bodyLength)))
        {
            throw Corrupt($"the file checksum does not match (stored {Convert.ToHexStringLower(file.AsSpan(bodyLength))}, computed {Convert.ToHexStringLower(actual)}): the file was changed or truncated");
        }

        Header header;
        try
        {
            header = Header.Read(file.AsSpan(PreambleLength, (int)headerLength));
        }
        catch (Exception ex) when (ex is JsonException or FormatException or InvalidOperationException or KeyNotFoundException or ArgumentException)
        {
            throw Corrupt($"the header is malformed ({ex.Message})");
        }

        long dataStart = Align8(PreambleLength + headerLength);
        if (header.DataLength < 0 || dataStart + header.DataLength != bodyLength)
            throw Corrupt($"the header says the data is {header.DataLength} bytes, but the file holds {bodyLength - dataStart}");
        for (long i = PreambleLength + headerLength; i < dataStart; i++)
        {
            if (file[i] != 0) throw Corrupt("the padding after the header is not zero");
        }

        var blocks = new Dictionary<string, ReadOnlyMemory<byte>>(StringComparer.Ordinal);
        var sections = new Dictionary<string, ReadOnlyMemory<byte>>(StringComparer.Ordinal);
        foreach (var (entries, target, kind) in new[] { (header.Blocks, blocks, "block"), (header.Sections, sections, "section") })
        {
            foreach (var entry in entries)
            {
                if (entry.Offset < 0 || entry.Length < 0 || entry.Offset > header.DataLength || entry.Length > header.DataLength - entry.Offset)
                    throw Corrupt($"the {kind} '{entry.Name}' (offset {entry.Offset}, length {entry.Length}) lies outside the {header.DataLength}-byte data region");
                if (target.ContainsKey(entry.Name))
                    throw Corrupt($"the {kind} '{entry.Name}' is listed twice");
                var data = new ReadOnlyMemory<byte>(file, (int)(dataStart + entry.Offset), (int)entry.Length);
                string sha = Convert.ToHexStringLower(SHA256.HashData(data.Span));
                if (!string.Equals(sha, entry.Sha256, StringComparison.OrdinalIgnoreCase))
                    throw Corrupt($"the {kind} '{entry.Name}' fails its SHA-256 check (stored {entry.Sha256}, computed {sha})");
                target.Add(entry.Name, data);
            }
        }
        if (!blocks.TryGetValue(RegistryBlock, out var registryBytes))
            throw Corrupt("the registry block is missing");
        if (!blocks.TryGetValue(EmbeddingsBlock, out var embeddingBytes))
            throw Corrupt("the embeddings block is missing");

        // The registry: its JSON must hash to the stored registry hash and rebuild a registry with that hash.
        string registryHash = Convert.ToHexStringLower(SHA256.HashData(registryBytes.Span));
        if (!string.Equals(registryHash, header.RegistryHash, StringComparison.OrdinalIgnoreCase))
            throw Corrupt($"the stored registry hash {header.RegistryHash} does not match the hash of the stored registry, {registryHash}");
        TaskRegistry registry;
        try
        {
            string json = new UTF8Encoding(false, throwOnInvalidBytes: true).GetString(registryBytes.Span);
            registry = RegistryCanonicalForm.FromJson(json, path);
        }
        catch (Exception ex) when (ex is RegistryException or DecoderFallbackException)
        {
            string detail = ex is RegistryException re ? re.Errors.First().ToString() : ex.Message;
            throw Corrupt($"the stored registry is invalid ({detail})");
        }
        if (registry.ContentHash != registryHash)
            throw Corrupt($"the stored registry is not in canonical form (its content hash is {registry.ContentHash}, the stored one {registryHash})");

        int phraseCount = registry.Tasks.Sum(t => t.Phrases.Count);
        if (header.PhraseCount != phraseCount || header.TaskCount != registry.Tasks.Count)
            throw Corrupt($"the header counts {header.PhraseCount} phrases in {header.TaskCount} tasks, but the registry has {phraseCount} in {registry.Tasks.Count}");
        if (header.Dimensions < 1 || header.Dimensions != header.Model.Dimensions)
            throw Corrupt($"the embedding width {header.Dimensions} is invalid or differs from the model's {header.Model.Dimensions}");
        long expectedBytes = (long)phraseCount * header.Dimensions * sizeof(float);
        if (embeddingBytes.Length != expectedBytes)
            throw Corrupt($"the embeddings block is {embeddingBytes.Length} bytes, but {phraseCount} phrases × {header.Dimensions} dimensions need {expectedBytes}");

        var embeddings = new float[phraseCount * header.Dimensions];
        if (BitConverter.IsLittleEndian)
        {
            embeddingBytes.Span.CopyTo(MemoryMarshal.AsBytes(embeddings.AsSpan()));
        }
        else
        {
            for (int i = 0; i < embeddings.Length; i++)
                embeddings[i] = BinaryPrimitives.ReadSingleLittleEndian(embeddingBytes.Span[(i * sizeof(float))..]);
        }
        for (int i = 0; i < embeddings.Length; i++)
        {
            if (!float.IsFinite(embeddings[i])) throw Corrupt($"embedding value {i} is not a finite number");
        }

        return new TaskIndex(registry, header.Model, embeddings, header.Dimensions, Freeze(sections), path);
    }

    private static bool LooksLikeText(byte[] file)
    {
        int n = Math.Min(file.Length, 64);
        if (n == 0) return false;
        for (int i = 0; i < n; i++)
        {
            byte b = file[i];
            if (b < 0x09 || (b > 0x0D && b < 0x20)) return false;
        }
        return true;
    }

    private sealed record Entry(string Name, long Offset, long Length, string Sha256);

    private sealed record Header(string RegistryHash, EmbeddingModelInfo Model, int PhraseCount, int TaskCount, int Dimensions,
        long DataLength, IReadOnlyList<Entry> Blocks, IReadOnlyList<Entry> Sections)
    {
        public static Header Read(ReadOnlySpan<byte> utf8)
        {
            var reader = new Utf8JsonReader(utf8, new JsonReaderOptions { MaxDepth = 8 });
            using var doc = JsonDocument.ParseValue(ref reader);
            var root = doc.RootElement;
            var model = root.GetProperty("model");
            return new Header(
                Hex(root, "registry_hash"),
                new EmbeddingModelInfo(
                    Text(model, "id"), Hex(model, "sha256"), model.GetProperty("dimensions").GetInt32(),
                    model.GetProperty("max_tokens").GetInt32(), Text(model, "pooling")),
                root.GetProperty("phrase_count").GetInt32(),
                root.GetProperty("task_count").GetInt32(),
                root.GetProperty("dimensions").GetInt32(),
                root.GetProperty("data_length").GetInt64(),
                Entries(root, "blocks"),
                Entries(root, "sections"));
        }

        private static List<Entry> Entries(JsonElement root, string name)
            => root.GetProperty(name).EnumerateArray()
                .Select(e => new Entry(Text(e, "name"), e.GetProperty("offset").GetInt64(), e.GetProperty("length").GetInt64(), Hex(e, "sha256")))
                .ToList();

        private static string Text(JsonElement e, string name)
        {
            string? value = e.GetProperty(name).GetString();
            return string.IsNullOrEmpty(value) ? throw new FormatException($"'{name}' is empty") : value;
        }

        private static string Hex(JsonElement e, string name)
        {
            string value = Text(e, name);
            if (value.Length != 64 || !value.All(Uri.IsHexDigit)) throw new FormatException($"'{name}' is not a SHA-256");
            return value.ToLowerInvariant();
        }
    }
}
