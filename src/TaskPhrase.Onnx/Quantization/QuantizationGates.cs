using System.Globalization;

namespace TaskPhrase.Onnx.Quantization;

/// <summary>
/// The quality gates an int8 model must pass to be written by <see cref="ModelQuantizer"/> and to be loaded by
/// <see cref="OnnxEmbedder"/>. The limits are fixed here, not read from the card, so editing a card cannot loosen them.
/// </summary>
public static class QuantizationGates
{
    /// <summary>Smallest allowed cosine between int8 and fp32 embeddings of any held-out phrase.</summary>
    public const double MinCosine = 0.99;

    /// <summary>Largest allowed difference of any Quickstart similarity from the fp32 model's (and, for all-MiniLM-L6-v2, from the published value).</summary>
    public const double MatrixTolerance = 0.01;

    /// <summary>Largest allowed difference of a CLINC150 audit rate (in-scope accuracy, wrong task, false accept) from fp32's: 1 point.</summary>
    public const double Clinc150Points = 0.01;

    /// <summary>
    /// The sentence-transformers Quickstart sentences ("Sentence Transformer" usage example): their similarity
    /// matrix is published for all-MiniLM-L6-v2.
    /// </summary>
    public static IReadOnlyList<string> QuickstartSentences { get; } =
        ["The weather is lovely today.", "It's so sunny outside!", "He drove to the stadium."];

    /// <summary>
    /// The published all-MiniLM-L6-v2 similarities of <see cref="QuickstartSentences"/> (sentence-transformers
    /// documentation, Quickstart): (0,1) 0.6660, (0,2) 0.1046, (1,2) 0.1411.
    /// </summary>
    public static IReadOnlyList<double> PublishedMiniLmMatrix { get; } = [0.6660, 0.1046, 0.1411];

    /// <summary>
    /// Checks the quantisation figures of a card. Returns null when they pass, else a description of the first
    /// failure (missing figures count as failing).
    /// </summary>
    /// <param name="card">A model card; cards without a <c>quantization</c> section pass.</param>
    public static string? Check(ModelCard card)
    {
        ArgumentNullException.ThrowIfNull(card);
        var q = card.Quantization;
        if (q is null) return null;
        if (string.IsNullOrWhiteSpace(q.Method)) return "\"quantization.method\" is missing";
        if (string.IsNullOrWhiteSpace(card.ModelSha256)) return "\"model_sha256\" is missing (the quality figures must be tied to the file they were measured on)";
        if (string.IsNullOrWhiteSpace(q.SourceModelSha256)) return "\"quantization.source_model_sha256\" is missing";
        return Check(q.Quality, q.SourceModelId);
    }

    /// <summary>Checks measured quality figures; returns null when they pass, else what failed.</summary>
    /// <param name="quality">The figures; null fails.</param>
    /// <param name="sourceModelId">Id of the fp32 source; for <see cref="BuiltInModels.MiniLmL6V2"/> the matrix is also held to the published values.</param>
    public static string? Check(QuantizationQuality? quality, string? sourceModelId)
    {
        if (quality is null) return "\"quantization.quality\" is missing";
        if (quality.HeldOutPhrases < 1) return "\"quantization.quality.held_out_phrases\" is missing or 0";
        if (!(quality.MinCosine >= MinCosine))
            return string.Create(CultureInfo.InvariantCulture, $"the held-out min cosine to fp32 is {quality.MinCosine:0.0000}, below the gate {MinCosine}");
        if (!(quality.MeanCosine >= quality.MinCosine) || quality.MeanCosine > 1.0001)
            return string.Create(CultureInfo.InvariantCulture, $"the held-out mean cosine {quality.MeanCosine:0.0000} is inconsistent with the min cosine {quality.MinCosine:0.0000}");
        if (quality.SimilarityMatrix is not { Count: 3 } m) return "\"quantization.quality.similarity_matrix\" is missing or does not have 3 values";
        if (quality.SourceSimilarityMatrix is not { Count: 3 } s) return "\"quantization.quality.source_similarity_matrix\" is missing or does not have 3 values";
        for (int i = 0; i < 3; i++)
        {
            if (!(Math.Abs(m[i] - s[i]) <= MatrixTolerance))
                return string.Create(CultureInfo.InvariantCulture, $"Quickstart similarity {i + 1} is {m[i]:0.0000} against fp32 {s[i]:0.0000}, more than ±{MatrixTolerance} apart");
            if (sourceModelId == BuiltInModels.MiniLmL6V2 && !(Math.Abs(m[i] - PublishedMiniLmMatrix[i]) <= MatrixTolerance))
                return string.Create(CultureInfo.InvariantCulture, $"Quickstart similarity {i + 1} is {m[i]:0.0000} against the published {PublishedMiniLmMatrix[i]:0.0000}, more than ±{MatrixTolerance} apart");
        }
        if (quality.Clinc150 is { } c)
        {
            if (c.Fp32 is not { } f || c.Int8 is not { } q || c.InScope < 1 || c.OutOfScope < 1)
                return "\"quantization.quality.clinc150\" is incomplete (fp32, int8, in_scope and out_of_scope are needed)";
            foreach (var (name, a, b) in new[] { ("in-scope accuracy", f.InScopeAccuracy, q.InScopeAccuracy), ("wrong-task rate", f.WrongTask, q.WrongTask), ("false-accept rate", f.FalseAccept, q.FalseAccept) })
                if (!(Math.Abs(a - b) <= Clinc150Points + 1e-9))
                    return string.Create(CultureInfo.InvariantCulture, $"the CLINC150 {name} is {b:P2} against fp32 {a:P2}, more than {Clinc150Points * 100} point apart");
        }
        return null;
    }
}
