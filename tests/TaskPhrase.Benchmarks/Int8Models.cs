using TaskPhrase.Onnx;
using TaskPhrase.Onnx.Quantization;

namespace TaskPhrase.Benchmarks;

/// <summary>
/// The int8 variant of the built-in model for the benchmarks: made once with <see cref="ModelQuantizer"/> into the
/// scratch folder (about 10 s) and reused while its card names the current fp32 model as its source and the current method.
/// </summary>
internal static class Int8Models
{
    /// <summary>The int8 model directory: <paramref name="given"/> when set, else the cached (or freshly made) scratch copy.</summary>
    public static string Directory(string? given = null)
    {
        if (!string.IsNullOrEmpty(given)) return given;
        string dir = Path.Combine(BenchmarkPaths.Scratch, "all-minilm-l6-v2-int8");
        string card = Path.Combine(dir, "model.json");
        if (File.Exists(card))
        {
            try
            {
                var q = ModelCard.Load(card).Quantization;
                using var fp32 = OnnxEmbedder.Create(BenchmarkPaths.ModelDirectory);
                if (q?.SourceModelSha256 == fp32.Model.Sha256 && q.Alpha == new QuantizationOptions().Alpha && q.Method == ModelQuantizer.Method) return dir;
            }
            catch (InvalidDataException)
            {
                // A stale or damaged copy: make it again below.
            }
        }
        Console.Error.WriteLine($"quantising {BenchmarkPaths.ModelDirectory} into {dir} ...");
        var result = ModelQuantizer.Quantize(BenchmarkPaths.ModelDirectory, dir);
        if (!result.Passed) throw new InvalidOperationException($"The int8 model failed its quality gate: {result.Failure}");
        return dir;
    }
}
