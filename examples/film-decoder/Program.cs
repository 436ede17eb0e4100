using System.Globalization;
using FilmDecoderDemo;
using TaskPhrase.Conditioning;

// FiLM decoder demo for the Harbor Street task water-basil (controller pour-arc.v2, 2 latent dims).
// Exit codes follow taskphrase: 0 success, 2 bad usage or unreadable input.
const string Usage = """
    usage:
      FilmDecoderDemo --write-weights DIR
      FilmDecoderDemo --weights DIR (--embedding FILE | --conditioning FILE) [--joystick X,Y ...]

      --write-weights DIR   write the invented demo decoder, FiLM generator and a stand-in embedding to DIR
      --weights DIR         read pour-arc.v2.decoder.safetensors and pour-arc.v2.film.safetensors from DIR
      --embedding FILE      a JSON array of 384 floats (or `taskphrase embed --json` output); - for stdin
      --conditioning FILE   {"layers":[{"gamma":[...],"beta":[...]}]} or a `taskphrase resolve --film --json` line
      --joystick X,Y        a joystick deflection in [-1, 1]^2; may repeat (default: a few typical inputs)
    """;

var options = new Dictionary<string, List<string>>(StringComparer.Ordinal);
for (var i = 0; i < args.Length; i++)
{
    if (args[i] is "-h" or "--help")
    {
        Console.WriteLine(Usage);
        return 0;
    }

    if (!args[i].StartsWith("--", StringComparison.Ordinal) || i + 1 >= args.Length)
    {
        return Fail($"'{args[i]}' needs a value or is not an option.");
    }

    if (!options.TryGetValue(args[i], out var values))
    {
        options[args[i]] = values = [];
    }

    values.Add(args[++i]);
}

string? Single(string name) => options.TryGetValue(name, out var v) ? v[^1] : null;

var unknown = options.Keys.Except(["--write-weights", "--weights", "--embedding", "--conditioning", "--joystick"]).FirstOrDefault();
if (unknown is not null)
{
    return Fail($"unknown option '{unknown}'.");
}

Console.WriteLine("FiLM decoder demo: task water-basil, controller pour-arc.v2 (2 latent dims)");
Console.WriteLine($"DEMO DATA: all weights are invented (seed 0x{DemoWeights.Seed:X}), not trained; never drive a real arm with them.");

try
{
    if (Single("--write-weights") is { } target)
    {
        if (options.Count > 1)
        {
            return Fail("--write-weights takes no other options.");
        }

        DemoWeights.Write(target);
        foreach (var file in new[] { DemoWeights.DecoderFile, DemoWeights.FilmFile, DemoWeights.EmbeddingFile })
        {
            Console.WriteLine($"wrote {Path.Combine(target, file)}");
        }

        return 0;
    }

    if (Single("--weights") is not { } directory || (Single("--embedding") is null) == (Single("--conditioning") is null))
    {
        return Fail("give --write-weights DIR, or --weights DIR with exactly one of --embedding and --conditioning.");
    }

    var inputs = options.TryGetValue("--joystick", out var given)
        ? given.Select(ParseJoystick).ToList()
        : [(0f, 0f), (1f, 0f), (-1f, 0f), (0f, 1f), (0f, -1f), (0.7f, 0.7f), (0.02f, -0.03f)];

    var decoder = LatentActionDecoder.Load(Path.Combine(directory, DemoWeights.DecoderFile));
    FilmConditioning conditioning;
    if (Single("--embedding") is { } embeddingSource)
    {
        var generator = FilmGenerator.Load(Path.Combine(directory, DemoWeights.FilmFile), DemoWeights.EmbeddingDimensions);
        Console.WriteLine($"generator: {generator}");
        conditioning = generator.Compute(ConditioningInput.ReadEmbedding(embeddingSource, generator.EmbeddingDimensions));
        Console.WriteLine($"conditioning: computed from the embedding in {embeddingSource} (use the embedding of the matched approved phrase, never of the raw utterance)");
    }
    else
    {
        conditioning = ConditioningInput.ReadConditioning(Single("--conditioning")!);
        Console.WriteLine($"conditioning: read from {Single("--conditioning")}");
    }

    var gamma = conditioning.Layers[0].Gamma.Span;
    Console.WriteLine($"  layer 0: gamma in [{Min(gamma):0.000}, {Max(gamma):0.000}], beta in [{Min(conditioning.Layers[0].Beta.Span):0.000}, {Max(conditioning.Layers[0].Beta.Span):0.000}]");

    LatentActionDecoder.CheckCompatible(conditioning);
    Console.WriteLine();
    Console.WriteLine("joystick (x, y)   joint velocity command q1..q6, rad/s");
    Console.WriteLine($"limits           {string.Join(" ", LatentActionDecoder.VelocityLimits.Select(l => $"{"±" + l.ToString("0.00", CultureInfo.InvariantCulture),6}"))}");
    foreach (var (x, y) in inputs)
    {
        var command = decoder.Decode(x, y, conditioning);
        var note = command.AtRest ? "  at rest: no motion" : command.Clipped ? "  (clipped to limits)" : string.Empty;
        Console.WriteLine($"{x,6:0.00} {y,6:0.00}    {string.Join(" ", command.Velocities.Select(v => $"{v,6:0.000}"))}{note}");
    }

    return 0;
}
catch (Exception ex) when (ex is IOException or UnauthorizedAccessException or FormatException or ArgumentException)
{
    return Fail(ex.Message);
}

static (float X, float Y) ParseJoystick(string text)
{
    var parts = text.Split(',');
    if (parts.Length != 2
        || !float.TryParse(parts[0], NumberStyles.Float, CultureInfo.InvariantCulture, out var x)
        || !float.TryParse(parts[1], NumberStyles.Float, CultureInfo.InvariantCulture, out var y)
        || Math.Abs(x) > 1 || Math.Abs(y) > 1)
    {
        throw new FormatException($"--joystick '{text}': expected X,Y with both in [-1, 1], e.g. 0.5,-0.25.");
    }

    return (x, y);
}

static float Min(ReadOnlySpan<float> values) => System.Numerics.Tensors.TensorPrimitives.Min(values);

static float Max(ReadOnlySpan<float> values) => System.Numerics.Tensors.TensorPrimitives.Max(values);

static int Fail(string message)
{
    Console.Error.WriteLine($"FilmDecoderDemo: {message}");
    return 2;
}
