namespace TaskPhrase.Conditioning;

/// <summary>
/// The element types of the safetensors format, declared in the reference implementation's order
/// (increasing alignment), which <see cref="SafeTensorsWriter"/> uses to lay tensors out.
/// In a file header they are spelled <c>BOOL</c>, <c>U8</c>, <c>I8</c>, <c>F8_E5M2</c>, <c>F8_E4M3</c>,
/// <c>F8_E8M0</c>, <c>I16</c>, <c>U16</c>, <c>F16</c>, <c>BF16</c>, <c>I32</c>, <c>U32</c>, <c>F32</c>,
/// <c>F64</c>, <c>I64</c>, <c>U64</c>. Sub-byte types (<c>F4</c>, <c>F6_*</c>) are not supported.
/// </summary>
public enum SafeTensorsDType
{
    /// <summary>Boolean, one byte (<c>BOOL</c>).</summary>
    Bool,

    /// <summary>Unsigned 8-bit integer (<c>U8</c>).</summary>
    U8,

    /// <summary>Signed 8-bit integer (<c>I8</c>).</summary>
    I8,

    /// <summary>8-bit float with 5 exponent and 2 mantissa bits (<c>F8_E5M2</c>).</summary>
    F8E5M2,

    /// <summary>8-bit float with 4 exponent and 3 mantissa bits (<c>F8_E4M3</c>).</summary>
    F8E4M3,

    /// <summary>8-bit exponent-only scale factor (<c>F8_E8M0</c>).</summary>
    F8E8M0,

    /// <summary>Signed 16-bit integer (<c>I16</c>).</summary>
    I16,

    /// <summary>Unsigned 16-bit integer (<c>U16</c>).</summary>
    U16,

    /// <summary>IEEE 754 half precision (<c>F16</c>); <see cref="SafeTensorsFile.ReadFloats(string)"/> widens it to float.</summary>
    F16,

    /// <summary>bfloat16 (<c>BF16</c>); <see cref="SafeTensorsFile.ReadFloats(string)"/> widens it to float.</summary>
    BF16,

    /// <summary>Signed 32-bit integer (<c>I32</c>).</summary>
    I32,

    /// <summary>Unsigned 32-bit integer (<c>U32</c>).</summary>
    U32,

    /// <summary>IEEE 754 single precision (<c>F32</c>).</summary>
    F32,

    /// <summary>IEEE 754 double precision (<c>F64</c>).</summary>
    F64,

    /// <summary>Signed 64-bit integer (<c>I64</c>).</summary>
    I64,

    /// <summary>Unsigned 64-bit integer (<c>U64</c>).</summary>
    U64,
}
