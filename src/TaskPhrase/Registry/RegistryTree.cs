namespace TaskPhrase.Registry;

/// <summary>A place in a source text: 1-based line and column; (0, 0) when unknown.</summary>
internal readonly record struct SourcePosition(int Line, int Column)
{
    public static SourcePosition None => default;

    public string Describe() => Line > 0 ? $"line {Line}, column {Column}" : "an unknown place";
}

/// <summary>
/// A node of the small document tree the validator works on. Built from YAML events or JSON tokens,
/// with positions, no anchors, no tags and no duplicate keys. Internal: the public model is <see cref="TaskRegistry"/>.
/// </summary>
internal abstract class RegistryNode(SourcePosition position)
{
    public SourcePosition Position { get; } = position;

    /// <summary>"a list", "a mapping", "the text 'x'": for wrong-type messages.</summary>
    public abstract string Describe();
}

internal sealed class RegistryScalar(SourcePosition position, string value, bool isPlain) : RegistryNode(position)
{
    /// <summary>The scalar's value with YAML escapes and folding already applied.</summary>
    public string Value { get; } = value;

    /// <summary>True for an unquoted scalar: only those can be null, booleans or numbers.</summary>
    public bool IsPlain { get; } = isPlain;

    /// <summary>True for an empty plain scalar or a plain <c>~</c> / <c>null</c> (YAML 1.2 core schema null).</summary>
    public bool IsNull => IsPlain && Value is "" or "~" or "null" or "Null" or "NULL";

    public override string Describe()
    {
        if (IsNull) return "empty";
        string shown = Value.Length > 40 ? Value[..40] + "…" : Value;
        return IsPlain ? $"'{shown}'" : $"the quoted text \"{shown}\"";
    }
}

internal sealed class RegistrySequence(SourcePosition position) : RegistryNode(position)
{
    public List<RegistryNode> Items { get; } = [];

    public override string Describe() => "a list";
}

internal sealed class RegistryMapping(SourcePosition position) : RegistryNode(position)
{
    public List<KeyValuePair<RegistryScalar, RegistryNode>> Entries { get; } = [];

    public override string Describe() => "a mapping";

    public bool TryGet(string key, out RegistryScalar keyNode, out RegistryNode value)
    {
        foreach (var entry in Entries)
        {
            if (entry.Key.Value == key)
            {
                keyNode = entry.Key;
                value = entry.Value;
                return true;
            }
        }
        keyNode = null!;
        value = null!;
        return false;
    }

    public RegistryScalar? FindKey(string key)
    {
        foreach (var entry in Entries)
            if (entry.Key.Value == key) return entry.Key;
        return null;
    }
}
