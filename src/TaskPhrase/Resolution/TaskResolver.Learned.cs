using TaskPhrase.Resolution.Scoring;

namespace TaskPhrase.Resolution;

public sealed partial class TaskResolver
{
    /// <summary>The learned head in force (strategy <see cref="ScoringStrategy.Head"/>), else null.</summary>
    internal TaskHead? Head => Volatile.Read(ref _state).Head;

    /// <summary>
    /// A resolver on the same registry, generator and options whose head is <paramref name="head"/> instead of a
    /// freshly trained one (for example the same head at another temperature, when tuning).
    /// </summary>
    internal TaskResolver WithHead(TaskHead head)
    {
        var s = Volatile.Read(ref _state);
        var state = ResolverState.Build(s.Registry, s.Model, s.Phrases, s.MustReject, ScoringStrategy.Head, _options.Learned, head) with { TopK = s.TopK };
        return new TaskResolver(_generator, _model, _options, state);
    }
}
