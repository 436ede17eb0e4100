using Microsoft.Extensions.AI;
using TaskPhrase.Embedding;

namespace TaskPhrase.Tests.TestDoubles;

/// <summary>
/// A hand-written fake embedding generator: maps known strings to chosen vectors, returned L2-normalised like a
/// real sentence-embedding model's. An unknown string fails the call with a message naming it, so a test never
/// runs on made-up vectors by accident. Records every call. Thread-safe.
/// </summary>
public sealed class ScriptedEmbeddingGenerator : IEmbeddingGenerator<string, Embedding<float>>
{
    private readonly Dictionary<string, float[]> _vectors = new(StringComparer.Ordinal);
    private readonly List<IReadOnlyList<string>> _calls = [];
    private readonly object _gate = new();

    /// <param name="vectors">Text → vector (any length, not necessarily unit; all of one width).</param>
    /// <param name="model">Returned by <c>GetService(typeof(EmbeddingModelInfo))</c>; a made-up identity when null.</param>
    public ScriptedEmbeddingGenerator(IEnumerable<KeyValuePair<string, float[]>> vectors, EmbeddingModelInfo? model = null)
    {
        foreach (var (text, vector) in vectors)
        {
            if (_vectors.Count > 0 && _vectors.Values.First().Length != vector.Length)
                throw new ArgumentException($"Vector for '{text}' has {vector.Length} dimensions, others have {_vectors.Values.First().Length}.");
            _vectors.Add(text, Normalize(vector, text));
        }
        Dimensions = _vectors.Count > 0 ? _vectors.Values.First().Length : 0;
        Model = model ?? new EmbeddingModelInfo("scripted-test-model", new string('0', 64), Dimensions, 256, "mean");
    }

    /// <summary>Width of the scripted vectors.</summary>
    public int Dimensions { get; }

    /// <summary>The model identity this fake reports.</summary>
    public EmbeddingModelInfo Model { get; }

    /// <summary>The inputs of every <see cref="GenerateAsync"/> call so far, in call order.</summary>
    public IReadOnlyList<IReadOnlyList<string>> Calls
    {
        get { lock (_gate) return _calls.ToArray(); }
    }

    /// <summary>The (normalised) vector scripted for <paramref name="text"/>.</summary>
    public float[] VectorOf(string text) => (float[])Lookup(text).Clone();

    /// <inheritdoc />
    public Task<GeneratedEmbeddings<Embedding<float>>> GenerateAsync(IEnumerable<string> values,
        EmbeddingGenerationOptions? options = null, CancellationToken cancellationToken = default)
    {
        cancellationToken.ThrowIfCancellationRequested();
        var inputs = values.ToArray();
        lock (_gate) _calls.Add(inputs);
        var result = new GeneratedEmbeddings<Embedding<float>>(inputs.Length);
        foreach (var text in inputs) result.Add(new Embedding<float>(Lookup(text).ToArray()));
        return Task.FromResult(result);
    }

    /// <inheritdoc />
    public object? GetService(Type serviceType, object? serviceKey = null)
    {
        if (serviceKey is not null) return null;
        if (serviceType == typeof(EmbeddingModelInfo)) return Model;
        if (serviceType == typeof(EmbeddingGeneratorMetadata)) return new EmbeddingGeneratorMetadata("scripted", null, Model.Id, Dimensions);
        return serviceType.IsInstanceOfType(this) ? this : null;
    }

    /// <inheritdoc />
    public void Dispose()
    {
    }

    private float[] Lookup(string text)
        => _vectors.TryGetValue(text, out var v) ? v
            : throw new KeyNotFoundException($"ScriptedEmbeddingGenerator has no vector for \"{text}\"; add it to the script.");

    private static float[] Normalize(float[] vector, string text)
    {
        double norm = Math.Sqrt(vector.Sum(x => (double)x * x));
        if (norm == 0 || !double.IsFinite(norm)) throw new ArgumentException($"Vector for '{text}' has no direction.");
        return vector.Select(x => (float)(x / norm)).ToArray();
    }
}
