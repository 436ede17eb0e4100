using CsCheck;
using TaskPhrase.Conditioning;

namespace TaskPhrase.Tests.Conditioning;

public class SafeTensorsWriterTests
{
    // Byte vectors published in the reference implementation's tests (huggingface/safetensors,
    // safetensors/src/tensor.rs: test_serialization, test_serialization_forced_alignement, test_empty),
    // transcribed from their decimal arrays to hex.
    private const string ReferenceAttnDot0 =
        "40000000000000007B226174746E2E30223A7B226474797065223A22463332222C227368617065223A5B312C322C335D2C22646174615F6F666673657473223A5B302C32345D7D7D"
        + "000000000000803F0000004000004040000080400000A040";

    private const string ReferenceAttn0ForcedAlignment =
        "48000000000000007B226174746E30223A7B226474797065223A22463332222C227368617065223A5B312C312C322C335D2C22646174615F6F666673657473223A5B302C32345D7D7D20202020202020"
        + "000000000000803F0000004000004040000080400000A040";

    private const string ReferenceEmpty = "08000000000000007B7D202020202020";

    private const string ReferenceEmptyWithMetadata = "28000000000000007B225F5F6D657461646174615F5F223A7B226672616D65776F726B223A227074227D7D2020202020";

    private static readonly float[] ZeroToFive = [0, 1, 2, 3, 4, 5];

    [Fact]
    public void ToArray_ReferenceSerializationExample_MatchesPublishedBytes()
        => Assert.Equal(ReferenceAttnDot0, Convert.ToHexString(new SafeTensorsWriter().AddFloat32("attn.0", ZeroToFive, 1, 2, 3).ToArray()));

    [Fact]
    public void ToArray_ReferenceForcedAlignmentExample_PadsHeaderWithSpaces()
        => Assert.Equal(ReferenceAttn0ForcedAlignment, Convert.ToHexString(new SafeTensorsWriter().AddFloat32("attn0", ZeroToFive, 1, 1, 2, 3).ToArray()));

    [Fact]
    public void ToArray_ReferenceEmptyExamples_MatchPublishedBytes()
    {
        Assert.Equal(ReferenceEmpty, Convert.ToHexString(new SafeTensorsWriter().ToArray()));
        Assert.Equal(ReferenceEmptyWithMetadata, Convert.ToHexString(new SafeTensorsWriter().SetMetadata("framework", "pt").ToArray()));
    }

    [Theory]
    [InlineData(false, "film-2layer-d3-e4.safetensors")]
    [InlineData(true, "film-2layer-d3-e4-residual.safetensors")]
    public void ToArray_FilmGenerator_IsByteIdenticalToIndependentPythonWriter(bool residual, string fixture)
    {
        // Differential check against make_fixtures.py (the independent reference writer). Tensors are added
        // in a scrambled order: the canonical layout must not depend on it.
        var writer = new SafeTensorsWriter()
            .AddFloat32("film.1.beta.bias", Fixtures.Film.Beta1Bias, 3)
            .AddFloat32("film.0.gamma.weight", Fixtures.Film.Gamma0Weight, 3, 4)
            .AddFloat32("film.1.gamma.weight", Fixtures.Film.Gamma1Weight, 3, 4)
            .AddFloat32("film.0.beta.bias", Fixtures.Film.Beta0Bias, 3)
            .AddFloat32("film.0.gamma.bias", Fixtures.Film.Gamma0Bias, 3)
            .AddFloat32("film.1.beta.weight", Fixtures.Film.Beta1Weight, 3, 4)
            .AddFloat32("film.0.beta.weight", Fixtures.Film.Beta0Weight, 3, 4)
            .AddFloat32("film.1.gamma.bias", Fixtures.Film.Gamma1Bias, 3)
            .SetMetadata("note", Fixtures.Film.Note);
        if (residual)
        {
            writer.SetMetadata("gamma", "residual");
        }

        Assert.Equal(Fixtures.Bytes(fixture), writer.ToArray());
    }

    [Fact]
    public void ToArray_MixedDtypesEscapesAndUnicode_IsByteIdenticalToIndependentPythonWriter()
    {
        // make_fixtures.py orders by descending dtype alignment (I64 first, U8 last), then by code point, and
        // escapes only quote, backslash and control characters (json.dumps with ensure_ascii=False, like
        // serde_json in the reference writer).
        var writer = new SafeTensorsWriter()
            .AddTensor("u8", SafeTensorsDType.U8, [3], [0, 127, 255])
            .AddTensor("bf16", SafeTensorsDType.BF16, [2, 2], Bf16(1f, -2.5f, 0.15625f, 196608f))
            .AddTensor("f16", SafeTensorsDType.F16, [4], F16(0.5f, -1.75f, 65504f, MathF.Pow(2, -24)))
            .AddFloat32("f32", [0.1f, -3.0e38f], 2)
            .AddTensor("i64", SafeTensorsDType.I64, [2], [.. BitConverter.GetBytes(-1L), .. BitConverter.GetBytes(1L << 40)])
            .AddFloat32("scalar", [42f])
            .AddFloat32("empty", [], 0, 3)
            .AddFloat32("odd \"name\" \\ \u03b3", [7f], 1)
            .SetMetadata("framework", "none")
            .SetMetadata("comment", "tab\there, quote \" and \u03b3");

        Assert.Equal(Fixtures.Bytes("dtypes.safetensors"), writer.ToArray());
    }

    [Fact]
    public void ToArray_AnyTensors_RoundTripsThroughReader()
    {
        // Property: whatever is written reads back bit for bit, the header length is a multiple of 8 and the
        // data of every tensor is aligned to its element size (the reference writer's layout guarantee).
        var dtypes = Enum.GetValues<SafeTensorsDType>();
        var entry = Gen.Select(Gen.Int[0, dtypes.Length - 1], Gen.Long[0, 3].Array[0, 3]);
        var name = Gen.String[Gen.Char["ab.\u03b3\"\\\t_0"], 1, 6];
        var file = Gen.Dictionary(name, entry)[0, 6];

        file.Sample(tensors =>
        {
            var writer = new SafeTensorsWriter();
            var expected = new Dictionary<string, byte[]>();
            var seed = 1;
            foreach (var (tensorName, (dtypeIndex, shape)) in tensors)
            {
                var dtype = dtypes[dtypeIndex];
                var size = shape.Aggregate(1L, (a, b) => a * b) * ElementSize(dtype);
                var data = Enumerable.Range(seed, (int)size).Select(i => (byte)i).ToArray();
                seed += 7;
                writer.AddTensor(tensorName, dtype, shape, data);
                expected[tensorName] = data;
            }

            using var read = SafeTensorsFile.FromBytes(writer.ToArray(), "generated");
            Assert.Equal(0, read.HeaderLength % 8);
            Assert.Equal(expected.Count, read.Tensors.Count);
            foreach (var tensor in read.Tensors)
            {
                Assert.Equal(expected[tensor.Name], read.ReadBytes(tensor.Name));
                Assert.Equal(0, tensor.DataBegin % ElementSize(tensor.DType));
            }
        });
    }

    [Fact]
    public void AddFloat32_WrongValueCount_IsRefused()
    {
        var error = Assert.Throws<ArgumentException>(() => new SafeTensorsWriter().AddFloat32("w", [1, 2, 3], 2, 2));

        Assert.Equal("Tensor 'w' with shape [2, 2] of F32 needs 16 bytes; 12 were given. (Parameter 'data')", error.Message);
    }

    [Fact]
    public void AddTensor_DuplicateOrReservedName_IsRefused()
    {
        var writer = new SafeTensorsWriter().AddFloat32("w", [1], 1);

        Assert.Contains("already added", Assert.Throws<ArgumentException>(() => writer.AddFloat32("w", [1], 1)).Message);
        Assert.Contains("reserved", Assert.Throws<ArgumentException>(() => writer.AddFloat32("__metadata__", [1], 1)).Message);
        Assert.Throws<ArgumentOutOfRangeException>(() => writer.AddFloat32("n", [], -1));
    }

    [Fact]
    public void Save_WritesTheSameBytesAndLeavesNoTemporaryFile()
    {
        var folder = Directory.CreateTempSubdirectory("taskphrase-writer-");
        try
        {
            var writer = new SafeTensorsWriter().AddFloat32("attn.0", ZeroToFive, 1, 2, 3);
            var path = Path.Combine(folder.FullName, "out.safetensors");

            writer.Save(path);
            writer.Save(path);

            Assert.Equal(ReferenceAttnDot0, Convert.ToHexString(File.ReadAllBytes(path)));
            Assert.Single(folder.GetFiles());
        }
        finally
        {
            folder.Delete(recursive: true);
        }
    }

    private static int ElementSize(SafeTensorsDType dtype) => dtype switch
    {
        SafeTensorsDType.F64 or SafeTensorsDType.I64 or SafeTensorsDType.U64 => 8,
        SafeTensorsDType.F32 or SafeTensorsDType.I32 or SafeTensorsDType.U32 => 4,
        SafeTensorsDType.F16 or SafeTensorsDType.BF16 or SafeTensorsDType.I16 or SafeTensorsDType.U16 => 2,
        _ => 1,
    };

    private static byte[] F16(params float[] values) => [.. values.SelectMany(v => BitConverter.GetBytes((Half)v))];

    private static byte[] Bf16(params float[] values) => [.. values.SelectMany(v => BitConverter.GetBytes(v)[2..4])];
}
