using System.Text;
using TaskPhrase.Conditioning;

namespace TaskPhrase.Tests.Conditioning;

public class SafeTensorsFileTests
{
    [Fact]
    public void Open_ReferenceFilmFile_ReadsEveryTensorExactly()
    {
        // Reference: make_fixtures.py (independent Python writer) wrote these numbers.
        using var file = SafeTensorsFile.Open(Fixtures.Path("film-2layer-d3-e4.safetensors"));

        Assert.Equal(8, file.Tensors.Count);
        Assert.Equal(Fixtures.Film.Gamma0Weight, file.ReadFloats("film.0.gamma.weight"));
        Assert.Equal(Fixtures.Film.Gamma0Bias, file.ReadFloats("film.0.gamma.bias"));
        Assert.Equal(Fixtures.Film.Beta0Weight, file.ReadFloats("film.0.beta.weight"));
        Assert.Equal(Fixtures.Film.Beta0Bias, file.ReadFloats("film.0.beta.bias"));
        Assert.Equal(Fixtures.Film.Gamma1Weight, file.ReadFloats("film.1.gamma.weight"));
        Assert.Equal(Fixtures.Film.Beta1Bias, file.ReadFloats("film.1.beta.bias"));
        Assert.Equal(new long[] { 3, 4 }, file.GetTensor("film.1.beta.weight").Shape);
        Assert.Equal(SafeTensorsDType.F32, file.GetTensor("film.1.beta.weight").DType);
        Assert.Equal(Fixtures.Film.Note, Assert.Single(file.Metadata, m => m.Key == "note").Value);
    }

    [Fact]
    public void Open_ReferenceFilmFile_HeaderAndOffsetsFollowTheFormat()
    {
        // Format (huggingface/safetensors README): 8-byte little-endian N, N header bytes, then the buffer;
        // the reference writer pads N to a multiple of 8 and lays tensors out in name order for one dtype.
        var bytes = Fixtures.Bytes("film-2layer-d3-e4.safetensors");
        using var file = SafeTensorsFile.Open(Fixtures.Path("film-2layer-d3-e4.safetensors"));

        Assert.Equal(BitConverter.ToInt64(bytes, 0), file.HeaderLength);
        Assert.Equal(0, file.HeaderLength % 8);
        Assert.Equal(bytes.Length, file.Length);
        Assert.Equal(
            ["film.0.beta.bias", "film.0.beta.weight", "film.0.gamma.bias", "film.0.gamma.weight", "film.1.beta.bias", "film.1.beta.weight", "film.1.gamma.bias", "film.1.gamma.weight"],
            file.Tensors.Select(t => t.Name));
        Assert.Equal(0, file.Tensors[0].DataBegin);
        Assert.Equal(file.Length - file.DataStart, file.Tensors[^1].DataEnd);
        for (var i = 1; i < file.Tensors.Count; i++)
        {
            Assert.Equal(file.Tensors[i - 1].DataEnd, file.Tensors[i].DataBegin);
        }
    }

    [Fact]
    public void ReadFloats_F16AndBF16_WidenExactly()
    {
        // Reference: make_fixtures.py packs F16 with struct's IEEE 754 half format 'e' and BF16 as the
        // upper 16 bits of float32; every value chosen is exactly representable (65504 is the largest
        // finite half, 2^-24 the smallest subnormal half — IEEE 754-2008 binary16).
        using var file = SafeTensorsFile.Open(Fixtures.Path("dtypes.safetensors"));

        Assert.Equal([0.5f, -1.75f, 65504f, MathF.Pow(2, -24)], file.ReadFloats("f16"));
        Assert.Equal([1f, -2.5f, 0.15625f, 196608f], file.ReadFloats("bf16"));
        Assert.Equal([0.1f, -3.0e38f], file.ReadFloats("f32"));
    }

    [Fact]
    public void Open_ReferenceDtypesFile_ScalarEmptyIntegersAndEscapedNamesAreRead()
    {
        using var file = SafeTensorsFile.Open(Fixtures.Path("dtypes.safetensors"));

        // The README allows 0-rank tensors (a scalar) and tensors with a 0 dimension (no data).
        Assert.Equal([42f], file.ReadFloats("scalar"));
        Assert.Empty(file.GetTensor("scalar").Shape);
        Assert.Equal(0, file.GetTensor("empty").ByteLength);
        Assert.Empty(file.ReadFloats("empty"));
        var i64 = file.ReadBytes("i64");
        Assert.Equal(-1L, BitConverter.ToInt64(i64, 0));
        Assert.Equal(1L << 40, BitConverter.ToInt64(i64, 8));
        Assert.Equal(new byte[] { 0, 127, 255 }, file.ReadBytes("u8"));
        Assert.Equal([7f], file.ReadFloats("odd \"name\" \\ \u03b3"));
        Assert.Equal("tab\there, quote \" and \u03b3", file.Metadata["comment"]);
        Assert.Equal("none", file.Metadata["framework"]);
    }

    [Fact]
    public void ReadFloats_IntegerTensor_IsRefusedNamingTheDtype()
    {
        using var file = SafeTensorsFile.Open(Fixtures.Path("dtypes.safetensors"));

        var error = Assert.Throws<SafeTensorsException>(() => file.ReadFloats("i64"));

        Assert.Equal("i64", error.TensorName);
        Assert.EndsWith("tensor 'i64': the dtype is I64; only F32, F16 and BF16 tensors can be read as floats. Convert the tensor when exporting it.", error.Message);
    }

    [Fact]
    public void GetTensor_UnknownName_ListsTensorsThatExist()
    {
        using var file = SafeTensorsFile.Open(Fixtures.Path("film-2layer-d3-e4.safetensors"));

        var error = Assert.Throws<SafeTensorsException>(() => file.GetTensor("film.0.gamma"));

        Assert.Contains("tensor 'film.0.gamma': no such tensor; the file has film.0.beta.bias, film.0.beta.weight,", error.Message);
        Assert.False(file.Contains("film.0.gamma"));
        Assert.False(file.TryGetTensor("film.0.gamma", out _));
    }

    [Theory]
    [InlineData("file-shorter-than-length-prefix.safetensors", null, "the file is 5 bytes long, shorter than the 8-byte header length that starts every safetensors file; it is truncated or not a safetensors file.")]
    [InlineData("header-length-beyond-file.safetensors", null, "the header length prefix says 4096 bytes but only 58 bytes follow it; the file is truncated or not a safetensors file.")]
    [InlineData("header-length-over-limit.safetensors", null, "the header length prefix says 200000000 bytes, more than the limit of 100000000 bytes; the file is corrupt or not a safetensors file.")]
    [InlineData("header-length-not-a-number.safetensors", null, "the header length prefix says 3978138829376729136 bytes, more than the limit of 100000000 bytes (the first 8 bytes are the text \"00000057\", not a binary little-endian number); the file is corrupt or not a safetensors file.")]
    [InlineData("header-not-utf8.safetensors", null, "the header is not valid UTF-8 (header line 1, column 4); the file is corrupt or not a safetensors file.")]
    [InlineData("header-not-object.safetensors", null, "the header must be a JSON object beginning with '{', but it starts with '['; the file is not a safetensors file.")]
    [InlineData("bad-json.safetensors", null, "the header is not valid JSON (header line 1, column 55): The JSON object contains a trailing comma at the end which is not supported in this mode. The file is corrupt or was not written by a safetensors writer.")]
    [InlineData("duplicate-tensor-name.safetensors", null, "tensor 'a' appears twice in the header (header line 1, column 2 and header line 1, column 55); names must be unique. Remove one of them.")]
    [InlineData("tensor-entry-not-object.safetensors", "a", "the entry is an array (header line 1, column 2); it must be an object with dtype, shape and data_offsets.")]
    [InlineData("unknown-dtype.safetensors", "a", "unknown dtype 'float32' (header line 1, column 2); expected one of BOOL, U8, I8, F8_E5M2, F8_E4M3, F8_E8M0, I16, U16, F16, BF16, I32, U32, F32, F64, I64, U64.")]
    [InlineData("dtype-size-mismatch.safetensors", "a", "shape [2] of F64 needs 16 bytes but data_offsets [0, 8] cover 8 bytes (header line 1, column 2); the dtype, shape or offsets are wrong.")]
    [InlineData("unknown-tensor-key.safetensors", "a", "unknown key 'offsets' in the entry (header line 1, column 33); a tensor entry has exactly dtype, shape and data_offsets.")]
    [InlineData("missing-shape.safetensors", "a", "'shape' is missing from the entry (header line 1, column 2); a tensor entry has dtype, shape and data_offsets.")]
    [InlineData("negative-offset.safetensors", "a", "data_offsets[0] is negative (-4, header line 1, column 49); sizes and offsets must be non-negative integers.")]
    [InlineData("offset-not-integer.safetensors", "a", "data_offsets[1] is 4.0, not an integer (header line 1, column 51); write it without a fraction or exponent.")]
    [InlineData("offset-too-large.safetensors", "a", "data_offsets[1] is 18446744073709551616, larger than the largest supported size 9223372036854775807 (header line 1, column 51); the header is corrupt.")]
    [InlineData("shape-overflow.safetensors", "a", "shape [4294967296, 4294967296, 4] of F32 has more bytes than a 64-bit size can count (header line 1, column 2); the header is corrupt.")]
    [InlineData("offsets-end-before-begin.safetensors", "a", "data_offsets [4, 0] end before they begin (header line 1, column 2); the header is corrupt.")]
    [InlineData("overlapping-offsets.safetensors", "b", "data_offsets [8, 24] overlap tensor 'a' [0, 16] (header line 1, column 56); every byte of the buffer must belong to exactly one tensor. The header is corrupt or crafted.")]
    [InlineData("gap-in-buffer.safetensors", "b", "bytes [16, 20) of the byte buffer, after tensor 'a', belong to no tensor (header line 1, column 56); the format requires the buffer to be fully covered with no holes. The header is corrupt or crafted.")]
    [InlineData("trailing-bytes-after-tensors.safetensors", null, "the last 4 bytes of the 20-byte buffer (from buffer offset 16) belong to no tensor; the format requires the buffer to be fully covered with no trailing data. The file has extra bytes or the header is wrong.")]
    [InlineData("truncated-data.safetensors", "film.1.gamma.weight", "data_offsets [192, 240] reach past the end of the byte buffer, which holds 228 bytes (header line 1, column 581); the file is truncated or the header is wrong.")]
    [InlineData("metadata-value-not-string.safetensors", null, "'__metadata__' value of 'gamma' is a number (header line 1, column 18); metadata values must be strings. Quote the value.")]
    [InlineData("metadata-not-object.safetensors", null, "'__metadata__' is an array (header line 1, column 17); it must be an object of string values.")]
    public void Open_MalformedReferenceFile_IsRefusedWithTheDefect(string fixture, string? tensor, string expected)
    {
        // Each fixture carries one defect, written byte by byte by make_fixtures.py. The rules come from the
        // huggingface/safetensors README ("Format" and its notes: no duplicate keys; header begins with '{')
        // and its reference reader (Metadata::validate in safetensors/src/tensor.rs: offsets contiguous from
        // 0, shape x dtype size = end - begin, the buffer fully covered, header at most 100,000,000 bytes).
        var path = Fixtures.Path(fixture);

        var error = Assert.Throws<SafeTensorsException>(() => SafeTensorsFile.Open(path).Dispose());

        var prefix = tensor is null ? $"{path}: " : $"{path}: tensor '{tensor}': ";
        Assert.Equal(prefix + expected, error.Message);
        Assert.Equal(path, error.SourceName);
        Assert.Equal(tensor, error.TensorName);
    }

    [Fact]
    public void FromStream_SameBytesAsFile_GivesSameTensors()
    {
        using var stream = new MemoryStream(Fixtures.Bytes("film-2layer-d3-e4.safetensors"));
        using var file = SafeTensorsFile.FromStream(stream, "memory stream", leaveOpen: true);

        Assert.Equal(Fixtures.Film.Beta1Weight, file.ReadFloats("film.1.beta.weight"));
        file.Dispose();
        Assert.True(stream.CanRead);
    }

    [Fact]
    public void FromStream_NotSeekable_IsRefusedWithAdvice()
    {
        using var stream = new ReadOnlyForwardStream(Fixtures.Bytes("film-2layer-d3-e4.safetensors"));

        var error = Assert.Throws<ArgumentException>(() => SafeTensorsFile.FromStream(stream, "pipe"));

        Assert.Contains("copy it into a MemoryStream", error.Message);
    }

    [Fact]
    public void FromStream_ReadsOnlyHeaderAndRequestedTensor()
    {
        // Bounded memory: opening reads the 8-byte prefix and the header; a tensor read touches only its range.
        var bytes = Fixtures.Bytes("film-2layer-d3-e4.safetensors");
        using var stream = new CountingStream(bytes);
        using var file = SafeTensorsFile.FromStream(stream, "counted");
        Assert.Equal(8 + file.HeaderLength, stream.BytesRead);

        file.ReadFloats("film.0.gamma.bias");

        Assert.Equal(8 + file.HeaderLength + 12, stream.BytesRead);
    }

    [Fact]
    public void FromBytes_HeaderOverCustomLimit_IsRefused()
    {
        var bytes = Fixtures.Bytes("film-2layer-d3-e4.safetensors");

        var error = Assert.Throws<SafeTensorsException>(() => SafeTensorsFile.FromBytes(bytes, "small limit", maxHeaderBytes: 64));

        Assert.Contains("more than the limit of 64 bytes", error.Message);
    }

    [Fact]
    public void ReadFloats_AfterDispose_Throws()
    {
        var file = SafeTensorsFile.Open(Fixtures.Path("film-2layer-d3-e4.safetensors"));
        file.Dispose();

        Assert.Throws<ObjectDisposedException>(() => file.ReadFloats("film.0.gamma.bias"));
    }

    [Fact]
    public void ReadFloats_SpanOfWrongLength_IsRefused()
    {
        using var file = SafeTensorsFile.Open(Fixtures.Path("film-2layer-d3-e4.safetensors"));

        var error = Assert.Throws<ArgumentException>(() => file.ReadFloats("film.0.gamma.bias", new float[4]));

        Assert.Contains("has 3 elements; the destination has 4", error.Message);
    }

    [Fact]
    public void ReadFloats_DataTruncatedAfterOpening_IsReported()
    {
        var stream = new MemoryStream();
        stream.Write(Fixtures.Bytes("film-2layer-d3-e4.safetensors"));
        using var file = SafeTensorsFile.FromStream(stream, "shrinking");
        stream.SetLength(file.DataStart + 8);

        var error = Assert.Throws<SafeTensorsException>(() => file.ReadFloats(file.Tensors[^1].Name));

        Assert.Equal(file.Tensors[^1].Name, error.TensorName);
        Assert.Contains("truncated or replaced while in use", error.Message);
    }

    [Fact]
    public void Open_ConcurrentReads_AllSeeTheSameValues()
    {
        using var file = SafeTensorsFile.Open(Fixtures.Path("film-2layer-d3-e4.safetensors"));
        var names = file.Tensors.Select(t => t.Name).ToArray();
        var expected = names.ToDictionary(n => n, file.ReadFloats);

        Parallel.For(0, 400, i =>
        {
            var name = names[i % names.Length];
            Assert.Equal(expected[name], file.ReadFloats(name));
        });
    }

    [Fact]
    public void Open_HeaderWithWhitespaceAndEscapes_IsAccepted()
    {
        // JSON allows white space between tokens and \u escapes in strings (RFC 8259 §2, §7); the README only
        // requires the header to begin with '{'. "F\u0033\u0032" is "F32".
        var header = "{\n  \"\\u0061\" : { \"dtype\" : \"F\\u0033\\u0032\", \"shape\" : [ 1 ], \"data_offsets\" : [ 0 , 4 ] }\n}\t  ";
        var bytes = WithPrefix(Encoding.UTF8.GetBytes(header), BitConverter.GetBytes(2.5f));

        using var file = SafeTensorsFile.FromBytes(bytes, "escapes");

        Assert.Equal([2.5f], file.ReadFloats("a"));
    }

    [Fact]
    public void Open_ErrorOnSecondLine_ReportsLineAndColumn()
    {
        var header = "{\n\"a\":{\"dtype\":\"F32\",\"shape\":[1],\"data_offsets\":[0,4]},\n\"a\":{\"dtype\":\"F32\",\"shape\":[1],\"data_offsets\":[4,8]}}";
        var bytes = WithPrefix(Encoding.UTF8.GetBytes(header), new byte[8]);

        var error = Assert.Throws<SafeTensorsException>(() => SafeTensorsFile.FromBytes(bytes, "two lines"));

        Assert.Equal("two lines: tensor 'a' appears twice in the header (header line 2, column 1 and header line 3, column 1); names must be unique. Remove one of them.", error.Message);
    }

    [Fact]
    public void Open_EmptyHeaderObject_HasNoTensors()
    {
        // The reference implementation's own test (safetensors/src/tensor.rs, test_empty) serialises an empty
        // file as the 16 bytes 08 00.. 00 '{' '}' and six spaces.
        byte[] bytes = [8, 0, 0, 0, 0, 0, 0, 0, (byte)'{', (byte)'}', 32, 32, 32, 32, 32, 32];

        using var file = SafeTensorsFile.FromBytes(bytes, "empty");

        Assert.Empty(file.Tensors);
        Assert.Empty(file.Metadata);
    }

    internal static byte[] WithPrefix(byte[] header, byte[] data)
    {
        var result = new byte[8 + header.Length + data.Length];
        BitConverter.GetBytes((ulong)header.Length).CopyTo(result, 0);
        header.CopyTo(result, 8);
        data.CopyTo(result, 8 + header.Length);
        return result;
    }

    /// <summary>A seekable stream over bytes that counts how many bytes were read from it.</summary>
    private sealed class CountingStream(byte[] bytes) : MemoryStream(bytes, writable: false)
    {
        public long BytesRead { get; private set; }

        // MemoryStream sends Read(Span) of a derived type through Stream.Read(Span), which calls this overload.
        public override int Read(byte[] buffer, int offset, int count)
        {
            var n = base.Read(buffer, offset, count);
            BytesRead += n;
            return n;
        }
    }

    /// <summary>A readable stream that cannot seek, like a pipe.</summary>
    private sealed class ReadOnlyForwardStream(byte[] bytes) : Stream
    {
        private readonly MemoryStream inner = new(bytes, writable: false);

        public override bool CanRead => true;

        public override bool CanSeek => false;

        public override bool CanWrite => false;

        public override long Length => throw new NotSupportedException();

        public override long Position { get => throw new NotSupportedException(); set => throw new NotSupportedException(); }

        public override int Read(byte[] buffer, int offset, int count) => inner.Read(buffer, offset, count);

        public override void Flush()
        {
        }

        public override long Seek(long offset, SeekOrigin origin) => throw new NotSupportedException();

        public override void SetLength(long value) => throw new NotSupportedException();

        public override void Write(byte[] buffer, int offset, int count) => throw new NotSupportedException();
    }
}
