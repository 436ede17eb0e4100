using System.Collections.ObjectModel;

namespace TaskPhrase.Conditioning;

/// <summary>
/// One tensor entry of a safetensors header, already validated against the file: name, element type,
/// shape (row-major) and the byte range of its data within the byte buffer that follows the header.
/// Immutable.
/// </summary>
public sealed class SafeTensorInfo
{
    internal SafeTensorInfo(string name, SafeTensorsDType dtype, long[] shape, long dataBegin, long dataEnd, long elementCount)
    {
        Name = name;
        DType = dtype;
        Shape = new ReadOnlyCollection<long>(shape);
        DataBegin = dataBegin;
        DataEnd = dataEnd;
        ElementCount = elementCount;
    }

    /// <summary>The tensor's name (the header key).</summary>
    public string Name { get; }

    /// <summary>The element type.</summary>
    public SafeTensorsDType DType { get; }

    /// <summary>The header spelling of <see cref="DType"/>, e.g. <c>F32</c>.</summary>
    public string DTypeName => SafeTensorsDTypes.Name(DType);

    /// <summary>The dimensions, outermost first; empty for a scalar.</summary>
    public IReadOnlyList<long> Shape { get; }

    /// <summary>Start of the data, in bytes from the start of the byte buffer (<c>data_offsets[0]</c>).</summary>
    public long DataBegin { get; }

    /// <summary>One past the end of the data, in bytes from the start of the byte buffer (<c>data_offsets[1]</c>).</summary>
    public long DataEnd { get; }

    /// <summary>Length of the data in bytes.</summary>
    public long ByteLength => DataEnd - DataBegin;

    /// <summary>Number of elements (the product of <see cref="Shape"/>; 1 for a scalar).</summary>
    public long ElementCount { get; }

    /// <summary>The shape as text, e.g. <c>[3, 384]</c>.</summary>
    public string ShapeText => FormatShape(Shape);

    /// <summary>True when the shape equals <paramref name="expected"/>.</summary>
    /// <param name="expected">The expected dimensions.</param>
    /// <returns>Whether rank and every dimension match.</returns>
    public bool HasShape(params ReadOnlySpan<long> expected)
    {
        if (expected.Length != Shape.Count)
        {
            return false;
        }

        for (var i = 0; i < expected.Length; i++)
        {
            if (Shape[i] != expected[i])
            {
                return false;
            }
        }

        return true;
    }

    /// <inheritdoc />
    public override string ToString() => $"{Name} {DTypeName} {ShapeText} [{DataBegin}, {DataEnd})";

    internal static string FormatShape(IEnumerable<long> shape) => "[" + string.Join(", ", shape) + "]";
}
