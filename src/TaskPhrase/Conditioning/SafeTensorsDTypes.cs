namespace TaskPhrase.Conditioning;

/// <summary>Header spellings and element sizes of <see cref="SafeTensorsDType"/>.</summary>
internal static class SafeTensorsDTypes
{
    private static readonly (SafeTensorsDType Type, string Name, int Size)[] Table =
    [
        (SafeTensorsDType.Bool, "BOOL", 1),
        (SafeTensorsDType.U8, "U8", 1),
        (SafeTensorsDType.I8, "I8", 1),
        (SafeTensorsDType.F8E5M2, "F8_E5M2", 1),
        (SafeTensorsDType.F8E4M3, "F8_E4M3", 1),
        (SafeTensorsDType.F8E8M0, "F8_E8M0", 1),
        (SafeTensorsDType.I16, "I16", 2),
        (SafeTensorsDType.U16, "U16", 2),
        (SafeTensorsDType.F16, "F16", 2),
        (SafeTensorsDType.BF16, "BF16", 2),
        (SafeTensorsDType.I32, "I32", 4),
        (SafeTensorsDType.U32, "U32", 4),
        (SafeTensorsDType.F32, "F32", 4),
        (SafeTensorsDType.F64, "F64", 8),
        (SafeTensorsDType.I64, "I64", 8),
        (SafeTensorsDType.U64, "U64", 8),
    ];

    /// <summary>All header spellings, for error messages.</summary>
    public static string NameList { get; } = string.Join(", ", Table.Select(t => t.Name));

    /// <summary>The header spelling, e.g. <c>F32</c>.</summary>
    public static string Name(SafeTensorsDType type) => Table[Index(type)].Name;

    /// <summary>Bytes per element.</summary>
    public static int Size(SafeTensorsDType type) => Table[Index(type)].Size;

    /// <summary>Parses an exact (case-sensitive) header spelling.</summary>
    public static bool TryParse(string name, out SafeTensorsDType type)
    {
        foreach (var entry in Table)
        {
            if (string.Equals(entry.Name, name, StringComparison.Ordinal))
            {
                type = entry.Type;
                return true;
            }
        }

        type = default;
        return false;
    }

    private static int Index(SafeTensorsDType type)
    {
        var index = (int)type;
        if ((uint)index >= (uint)Table.Length || Table[index].Type != type)
        {
            throw new ArgumentOutOfRangeException(nameof(type), type, "Not a safetensors dtype.");
        }

        return index;
    }
}
