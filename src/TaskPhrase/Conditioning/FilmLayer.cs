using System.Numerics.Tensors;

namespace TaskPhrase.Conditioning;

/// <summary>
/// FiLM parameters for one decoder layer: the scale γ and the shift β, both as wide as the layer
/// (Perez et al., 2018, "FiLM: Visual Reasoning with a General Conditioning Layer").
/// Immutable and thread-safe: the vectors are private copies exposed read-only; all values are finite.
/// Equality compares every element exactly; <see cref="IsApproximately"/> allows a tolerance.
/// </summary>
public sealed class FilmLayer : IEquatable<FilmLayer>
{
    private readonly float[] gamma;
    private readonly float[] beta;

    /// <summary>Creates a layer from copies of <paramref name="gamma"/> and <paramref name="beta"/>.</summary>
    /// <param name="gamma">The scale vector γ; at least one element.</param>
    /// <param name="beta">The shift vector β; as long as γ.</param>
    /// <exception cref="ArgumentException">Empty, different lengths, or a NaN or infinite value.</exception>
    public FilmLayer(ReadOnlySpan<float> gamma, ReadOnlySpan<float> beta)
        : this(gamma.ToArray(), beta.ToArray(), validate: true)
    {
    }

    private FilmLayer(float[] gamma, float[] beta, bool validate)
    {
        if (validate)
        {
            if (gamma.Length == 0)
            {
                throw new ArgumentException("γ must have at least one element.", nameof(gamma));
            }

            if (beta.Length != gamma.Length)
            {
                throw new ArgumentException($"β has {beta.Length} elements but γ has {gamma.Length}; both must have the layer's width.", nameof(beta));
            }

            CheckFinite(gamma, "γ", nameof(gamma));
            CheckFinite(beta, "β", nameof(beta));
        }

        this.gamma = gamma;
        this.beta = beta;
    }

    /// <summary>The layer's width (the length of γ and of β).</summary>
    public int Width => gamma.Length;

    /// <summary>The scale vector γ (read-only).</summary>
    public ReadOnlyMemory<float> Gamma => gamma;

    /// <summary>The shift vector β (read-only).</summary>
    public ReadOnlyMemory<float> Beta => beta;

    /// <summary>The identity modulation of a layer: γ = 1, β = 0, which leaves the layer's activations unchanged.</summary>
    /// <param name="width">The layer's width; at least 1.</param>
    /// <returns>The identity layer.</returns>
    public static FilmLayer Identity(int width)
    {
        ArgumentOutOfRangeException.ThrowIfNegativeOrZero(width);
        var ones = new float[width];
        Array.Fill(ones, 1f);
        return new FilmLayer(ones, new float[width], validate: false);
    }

    /// <summary>Modulates a hidden layer in place: h ← γ ⊙ h + β (see <see cref="FilmGenerator.Apply"/>).</summary>
    /// <param name="hidden">The layer's activations; exactly <see cref="Width"/> long.</param>
    /// <exception cref="ArgumentException"><paramref name="hidden"/> has the wrong length.</exception>
    public void Apply(Span<float> hidden) => FilmGenerator.Apply(hidden, gamma, beta);

    /// <summary>True when both layers have the same width and every γ and β element differs by at most <paramref name="tolerance"/>.</summary>
    /// <param name="other">The layer to compare with.</param>
    /// <param name="tolerance">Largest allowed absolute difference per element; not negative.</param>
    /// <returns>Whether they match within the tolerance.</returns>
    public bool IsApproximately(FilmLayer other, float tolerance)
    {
        ArgumentNullException.ThrowIfNull(other);
        ArgumentOutOfRangeException.ThrowIfNegative(tolerance);
        return other.Width == Width
            && MaxAbsDifference(gamma, other.gamma) <= tolerance
            && MaxAbsDifference(beta, other.beta) <= tolerance;
    }

    /// <inheritdoc />
    public bool Equals(FilmLayer? other)
        => other is not null && (ReferenceEquals(this, other) || (gamma.AsSpan().SequenceEqual(other.gamma) && beta.AsSpan().SequenceEqual(other.beta)));

    /// <inheritdoc />
    public override bool Equals(object? obj) => Equals(obj as FilmLayer);

    /// <inheritdoc />
    public override int GetHashCode()
    {
        var hash = new HashCode();
        hash.Add(Width);
        foreach (var value in gamma)
        {
            hash.Add(value);
        }

        foreach (var value in beta)
        {
            hash.Add(value);
        }

        return hash.ToHashCode();
    }

    /// <inheritdoc />
    public override string ToString() => $"FiLM layer, width {Width}";

    /// <summary>Wraps arrays the caller has just created and checked (no copy).</summary>
    internal static FilmLayer Wrap(float[] gamma, float[] beta) => new(gamma, beta, validate: true);

    private static float MaxAbsDifference(float[] left, float[] right)
    {
        var difference = new float[left.Length];
        TensorPrimitives.Subtract(left, right, difference);
        return Math.Abs(TensorPrimitives.MaxMagnitude(difference));
    }

    private static void CheckFinite(float[] values, string symbol, string parameter)
    {
        for (var i = 0; i < values.Length; i++)
        {
            if (!float.IsFinite(values[i]))
            {
                throw new ArgumentException($"{symbol}[{i}] is {values[i].ToString(System.Globalization.CultureInfo.InvariantCulture)}; FiLM parameters must be finite.", parameter);
            }
        }
    }
}
