using TaskPhrase.Conditioning;

namespace FilmDecoderDemo;

/// <summary>
/// A tiny two-axis latent-action decoder: joystick (x, y) → 16 tanh units, FiLM-modulated by the task's
/// conditioning → a 6-joint velocity command, clipped to fixed per-joint limits. Immutable and thread-safe.
/// </summary>
internal sealed class LatentActionDecoder
{
    public const int LatentDims = 2;
    public const int HiddenUnits = 16;
    public const int Joints = 6;
    public const string HiddenWeight = "decoder.hidden.weight";
    public const string HiddenBias = "decoder.hidden.bias";
    public const string OutputWeight = "decoder.output.weight";
    public const string OutputBias = "decoder.output.bias";

    /// <summary>Joystick deflections below this radius count as "at rest": no motion at all.</summary>
    public const float DeadZone = 0.05f;

    /// <summary>Per-joint speed limits in rad/s (invented, conservative values for a wheelchair-mounted arm).</summary>
    public static readonly float[] VelocityLimits = [0.5f, 0.5f, 0.6f, 0.8f, 0.8f, 1.0f];

    private readonly float[] hiddenWeight;
    private readonly float[] hiddenBias;
    private readonly float[] outputWeight;
    private readonly float[] outputBias;

    private LatentActionDecoder(float[] hiddenWeight, float[] hiddenBias, float[] outputWeight, float[] outputBias)
    {
        this.hiddenWeight = hiddenWeight;
        this.hiddenBias = hiddenBias;
        this.outputWeight = outputWeight;
        this.outputBias = outputBias;
    }

    public static LatentActionDecoder Load(string path)
    {
        using var file = SafeTensorsFile.Open(path);
        return new LatentActionDecoder(
            Read(file, HiddenWeight, HiddenUnits, LatentDims),
            Read(file, HiddenBias, HiddenUnits),
            Read(file, OutputWeight, Joints, HiddenUnits),
            Read(file, OutputBias, Joints));
    }

    /// <summary>
    /// The joint velocity command for a joystick deflection under the given conditioning. The command is
    /// D(u) − D(0), so a centred joystick never moves the arm whatever β is, and each joint is clipped.
    /// </summary>
    public JointCommand Decode(float x, float y, FilmConditioning conditioning)
    {
        if (!float.IsFinite(x) || !float.IsFinite(y))
        {
            throw new ArgumentException("Joystick values must be finite.");
        }

        CheckCompatible(conditioning);
        x = Math.Clamp(x, -1f, 1f);
        y = Math.Clamp(y, -1f, 1f);
        var velocities = new float[Joints];
        if (MathF.Sqrt((x * x) + (y * y)) < DeadZone)
        {
            return new JointCommand(velocities, Clipped: false, AtRest: true);
        }

        var moving = Forward(x, y, conditioning.Layers[0]);
        var rest = Forward(0, 0, conditioning.Layers[0]);
        var clipped = false;
        for (var j = 0; j < Joints; j++)
        {
            var v = moving[j] - rest[j];
            velocities[j] = Math.Clamp(v, -VelocityLimits[j], VelocityLimits[j]);
            clipped |= velocities[j] != v;
        }

        return new JointCommand(velocities, clipped, AtRest: false);
    }

    /// <summary>Refuses conditioning made for another decoder (the layer widths must be exactly [16]).</summary>
    public static void CheckCompatible(FilmConditioning conditioning)
    {
        if (conditioning.LayerWidths is not [HiddenUnits])
        {
            throw new ArgumentException($"The conditioning has layer widths [{string.Join(", ", conditioning.LayerWidths)}]; this decoder needs one layer of width {HiddenUnits}.");
        }
    }

    private float[] Forward(float x, float y, FilmLayer film)
    {
        Span<float> hidden = stackalloc float[HiddenUnits];
        for (var i = 0; i < HiddenUnits; i++)
        {
            hidden[i] = MathF.Tanh((hiddenWeight[2 * i] * x) + (hiddenWeight[(2 * i) + 1] * y) + hiddenBias[i]);
        }

        film.Apply(hidden); // h ← γ ⊙ h + β
        var output = new float[Joints];
        for (var j = 0; j < Joints; j++)
        {
            output[j] = System.Numerics.Tensors.TensorPrimitives.Dot(outputWeight.AsSpan(j * HiddenUnits, HiddenUnits), hidden) + outputBias[j];
        }

        return output;
    }

    private static float[] Read(SafeTensorsFile file, string name, params long[] shape)
    {
        var tensor = file.GetTensor(name);
        if (!tensor.HasShape(shape))
        {
            throw new SafeTensorsException(file.SourceName, name, $"shape is {tensor.ShapeText}; expected [{string.Join(", ", shape)}].");
        }

        return file.ReadFloats(name);
    }
}
