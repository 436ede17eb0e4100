using System.Buffers.Binary;
using System.Runtime.InteropServices;
using System.Security.Cryptography;
using System.Text;
using System.Text.Json;
using System.Text.RegularExpressions;
using TaskPhrase.Embedding;

namespace TaskPhrase.Registry;

public sealed partial class TaskIndex
{
    internal static ReadOnlySpan<byte> Magic => [0x89, (byte)'T', (byte)'P', (byte)'X', 0x0D, 0x0A, 0x1A, 0x0A];

    internal const int PreambleLength = 16;
    internal const int ChecksumLength = 32;
    internal const int MaxHeaderBytes = 1 << 20;
    internal const string RegistryBlock = "registry";
    internal const string EmbeddingsBlock = "embeddings";

    /// <summary>
    /// Writes the index of <paramref name="registry"/> to <paramref name="path"/>, atomically (temporary file in the
    /// same directory, then a rename that replaces any existing file) and deterministically.
    /// </summary>
    /// <param name="path">The index file to write.</param>
    /// <param name="registry">A registry made by <see cref="RegistryLoader"/> or <see cref="RegistryCanonicalForm.FromJson"/>.</param>
    /// <param name="model">The model that made <paramref name="phraseEmbeddings"/>.</param>
    /// <param name="phraseEmbeddings">Row-major, one row of <see cref="EmbeddingModelInfo.Dimensions"/> floats per approved
    /// phrase: tasks in registry order, then phrases in order.</param>
    /// <param name="sections">Named extra byte blobs to store (names: lower-case letters, digits, '.', '_', '-'; at most 64 characters).</param>
    /// <exception cref="ArgumentNullException">A required argument is null.</exception>
    /// <exception cref="ArgumentException">The path is empty; the embeddings do not have one row per phrase or hold
    /// non-finite values; a section name is invalid; or the registry's content hash does not match its content.</exception>
    /// <exception cref="IOException">The file cannot be written (the existing file, if any, is left as it was).</exception>
    public static void Write(string path, TaskRegistry registry, EmbeddingModelInfo model, ReadOnlySpan<float> phraseEmbeddings,
        IReadOnlyDictionary<string, byte[]>? sections = null)
    {
        ArgumentException.ThrowIfNullOrEmpty(path);
        ArgumentNullException.ThrowIfNull(registry);
        ArgumentNullException.ThrowIfNull(model);
        byte[] bytes = Serialize(registry, model, phraseEmbeddings, sections);
        WriteAtomically(path, bytes);
    }

    internal static byte[] Serialize(TaskRegistry registry, EmbeddingModelInfo model, ReadOnlySpan<float> phraseEmbeddings,
        IReadOnlyDictionary<string, byte[]>? sections)
    {
        if (model.Dimensions < 1)
            throw new ArgumentException($"The model's dimensions must be at least 1, but are {model.Dimensions}.", nameof(model));
        ArgumentException.ThrowIfNullOrEmpty(model.Id, nameof(model));
        if (!Sha256Hex().IsMatch(model.Sha256 ?? ""))
            throw new ArgumentException($"The model's SHA-256 must be 64 hex digits, but is '{model.Sha256}'.", nameof(model));

        string json = RegistryCanonicalForm.ToJson(registry);
        string hash = RegistryCanonicalForm.HashOf(json);
        if (hash != registry.ContentHash)
            throw new ArgumentException(
                $"The registry's ContentHash ({registry.ContentHash}) does not match its content ({hash}); load registries with RegistryLoader.", nameof(registry));
        var rebuilt = RegistryCanonicalForm.FromJson(json);
        if (rebuilt.ContentHash != hash)
            throw new ArgumentException("The registry is not in the loader's normalised form, so its index could not be read back; load registries with RegistryLoader.", nameof(registry));

        int phraseCount = registry.Tasks.Sum(t => t.Phrases.Count);
        long expected = (long)phraseCount * model.Dimensions;
        if (phraseEmbeddings.Length != expected)
            throw new ArgumentException(
                $"Expected {phraseCount} phrases × {model.Dimensions} dimensions = {expected} floats, but got {phraseEmbeddings.Length}.", nameof(phraseEmbeddings));
        if (expected * sizeof(float) > MaxFileBytes)
            throw new ArgumentException($"{phraseCount} phrases × {model.Dimensions} dimensions would make the index larger than {MaxFileBytes:N0} bytes.", nameof(phraseEmbeddings));
        for (int i = 0; i < phraseEmbeddings.Length; i++)
        {
            if (!float.IsFinite(phraseEmbeddings[i]))
                throw new ArgumentException($"Phrase embedding value {i} (row {i / model.Dimensions}) is {phraseEmbeddings[i]}; embeddings must be finite.", nameof(phraseEmbeddings));
        }

        var blobs = new List<(string Name, byte[] Data, bool IsSection)>
        {
            (RegistryBlock, Encoding.UTF8.GetBytes(json), false),
            (EmbeddingsBlock, FloatsToBytes(phraseEmbeddings), false),
        };
        if (sections is not null)
        {
            foreach (var (name, data) in sections.OrderBy(s => s.Key, StringComparer.Ordinal))
            {
                if (name is null || !SectionName().IsMatch(name))
                    throw new ArgumentException($"Section name '{name}' is invalid: use 1 to 64 lower-case letters, digits, '.', '_' or '-', starting with a letter or digit.", nameof(sections));
                ArgumentNullException.ThrowIfNull(data, $"sections[{name}]");
                blobs.Add((name, data, true));
            }
        }

        var entries = new List<(string Name, long Offset, long Length, string Sha, bool IsSection)>();
        long cursor = 0;
        foreach (var (name, data, isSection) in blobs)
        {
            entries.Add((name, cursor, data.LongLength, Convert.ToHexStringLower(SHA256.HashData(data)), isSection));
            cursor = Align8(cursor + data.LongLength);
        }
        long dataLength = cursor;

        byte[] header = WriteHeader(hash, model, phraseCount, registry.Tasks.Count, dataLength, entries);
        long dataStart = Align8(PreambleLength + header.Length);
        long total = dataStart + dataLength + ChecksumLength;
        if (total > MaxFileBytes)
            throw new ArgumentException($"The index would be {total:N0} bytes, over the limit of {MaxFileBytes:N0}.");

        var file = new byte[total];
        Magic.CopyTo(file);
        BinaryPrimitives.WriteUInt32LittleEndian(file.AsSpan(8), FormatVersion);
        BinaryPrimitives.WriteUInt32LittleEndian(file.AsSpan(12), (uint)header.Length);
        header.CopyTo(file, PreambleLength);
        for (int i = 0; i < blobs.Count; i++)
            blobs[i].Data.CopyTo(file, dataStart + entries[i].Offset);
        SHA256.HashData(file.AsSpan(0, (int)(total - ChecksumLength)), file.AsSpan((int)(total - ChecksumLength)));
        return file;
    }

    private static byte[] WriteHeader(string registryHash, EmbeddingModelInfo model, int phraseCount, int taskCount, long dataLength,
        List<(string Name, long Offset, long Length, string Sha, bool IsSection)> entries)
    {
        using var buffer = new MemoryStream();
        using (var w = new Utf8JsonWriter(buffer, new JsonWriterOptions { Indented = false }))
        {
            w.WriteStartObject();
            w.WriteString("registry_hash", registryHash);
            w.WriteStartObject("model");
            w.WriteString("id", model.Id);
            w.WriteString("sha256", model.Sha256.ToLowerInvariant());
            w.WriteNumber("dimensions", model.Dimensions);
            w.WriteNumber("max_tokens", model.MaxTokens);
            w.WriteString("pooling", model.Pooling);
            w.WriteEndObject();
            w.WriteNumber("phrase_count", phraseCount);
            w.WriteNumber("task_count", taskCount);
            w.WriteNumber("dimensions", model.Dimensions);
            w.WriteNumber("data_length", dataLength);
            foreach (bool sectionList in new[] { false, true })
            {
                w.WriteStartArray(sectionList ? "sections" : "blocks");
                foreach (var e in entries.Where(e => e.IsSection == sectionList))
                {
                    w.WriteStartObject();
                    w.WriteString("name", e.Name);
                    w.WriteNumber("offset", e.Offset);
                    w.WriteNumber("length", e.Length);
                    w.WriteString("sha256", e.Sha);
                    w.WriteEndObject();
                }
                w.WriteEndArray();
            }
            w.WriteEndObject();
        }
        if (buffer.Length > MaxHeaderBytes)
            throw new ArgumentException($"The index header would be {buffer.Length:N0} bytes, over the limit of {MaxHeaderBytes:N0} (too many sections?).");
        return buffer.ToArray();
    }

    private static byte[] FloatsToBytes(ReadOnlySpan<float> values)
    {
        var bytes = new byte[values.Length * sizeof(float)];
        if (BitConverter.IsLittleEndian)
        {
            MemoryMarshal.AsBytes(values).CopyTo(bytes);
        }
        else
        {
            for (int i = 0; i < values.Length; i++)
                BinaryPrimitives.WriteSingleLittleEndian(bytes.AsSpan(i * sizeof(float)), values[i]);
        }
        return bytes;
    }

    private static void WriteAtomically(string path, byte[] bytes)
    {
        string full = System.IO.Path.GetFullPath(path);
        string directory = System.IO.Path.GetDirectoryName(full) ?? ".";
        string temp = System.IO.Path.Combine(directory, $".{System.IO.Path.GetFileName(full)}.{Guid.NewGuid():N}.tmp");
        try
        {
            using (var stream = new FileStream(temp, FileMode.CreateNew, FileAccess.Write, FileShare.None))
            {
                stream.Write(bytes);
                stream.Flush(flushToDisk: true);
            }
            File.Move(temp, full, overwrite: true);
        }
        catch
        {
            try { File.Delete(temp); } catch (IOException) { } catch (UnauthorizedAccessException) { }
            throw;
        }
    }

    internal static long Align8(long value) => (value + 7) & ~7L;

    [GeneratedRegex("^[a-z0-9][a-z0-9._-]{0,63}$")]
    private static partial Regex SectionName();

    [GeneratedRegex("^[0-9a-fA-F]{64}$")]
    private static partial Regex Sha256Hex();
}
