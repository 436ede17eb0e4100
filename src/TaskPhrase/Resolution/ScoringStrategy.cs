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
}
