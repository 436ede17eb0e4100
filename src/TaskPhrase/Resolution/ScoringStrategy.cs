namespace TaskPhrase.Resolution;

/// <summary>How a task's score is computed from the cosine similarities of the utterance to its approved phrases.</summary>
public enum ScoringStrategy
{
    /// <summary>The best phrase (1-nearest neighbour): the task's score is its highest phrase similarity.</summary>
    BestPhrase,

    /// <summary>Cosine to the task centroid (the normalised mean of its phrase embeddings).</summary>
    Centroid,

    /// <summary>Mean of the task's top-k phrase similarities (k from <see cref="ResolverOptions.TopK"/>).</summary>
    TopK,

    /// <summary>Average of best-phrase and centroid scores: robust to one stray phrase, sharp on close wordings.</summary>
    Blend,

    /// <summary>
    /// Cosine to the task centroid after whitening with the approved phrases' shrunk covariance
    /// (see <see cref="Scoring.Whitening"/>; settings in <see cref="ResolverOptions.Learned"/>).
    /// </summary>
    Whitened,

    /// <summary>
    /// A learned task head (see <see cref="Scoring.TaskHead"/>): the geometric mean of the head's probability and the
    /// centroid cosine; the head's look-alike class, when it wins, rejects as a look-alike. Thresholds tuned
    /// for cosine strategies do not carry over: tune <c>accept</c> and <c>margin</c> for it.
    /// </summary>
    Head,
}
