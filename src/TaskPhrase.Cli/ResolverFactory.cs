using TaskPhrase.Registry;
using TaskPhrase.Resolution;

namespace TaskPhrase.Cli;

/// <summary>Builds a resolver from <c>--registry FILE</c> or <c>--index FILE</c> and a loaded model.</summary>
internal static class ResolverFactory
{
    public static TaskRegistry LoadRegistry(string path)
    {
        try
        {
            return RegistryLoader.Load(path);
        }
        catch (RegistryException e)
        {
            throw new CliException(string.Join(Environment.NewLine + "error: ", e.Diagnostics.Select(d => d.ToString())), ExitCodes.BadInput, e);
        }
        catch (FileNotFoundException e)
        {
            throw new CliException($"{path}: registry file not found ({e.Message}).", ExitCodes.BadInput, e);
        }
    }

    public static TaskResolver Create(string? registryPath, string? indexPath, ModelLease model, ResolverOptions? options = null)
    {
        if ((registryPath is null) == (indexPath is null))
            throw new CliException("give exactly one of --registry FILE or --index FILE.");
        if (registryPath is not null)
            return TaskResolver.Create(LoadRegistry(registryPath), model.Embedder, options);
        return FromIndex(LoadIndex(indexPath!, model), model, options);
    }

    /// <summary>
    /// Warns on standard error when the registry names a model its thresholds were tuned for (<c>model:</c>) and
    /// another one is loaded: thresholds do not carry over between models (cosines sit higher or lower).
    /// </summary>
    public static void WarnIfTunedForAnotherModel(CliContext context, TaskResolver resolver)
    {
        if (resolver.Registry.ModelId is { Length: > 0 } tuned && !string.Equals(tuned, resolver.Model.Id, StringComparison.OrdinalIgnoreCase))
            context.Err.WriteLine($"warning: the registry's thresholds were tuned for the model '{tuned}', but '{resolver.Model.Id}' is loaded; tune the registry with this model ('taskphrase tune --model …') before trusting its decisions.");
    }

    /// <summary>
    /// Loads the model and a resolver from <c>--registry</c> or <c>--index</c>. With an index the model loads on a
    /// worker thread while the index is read and the resolver set up (no forward pass needs it until the first
    /// resolve); the index is then checked against the real model. Errors come in the same order as when loading one
    /// after the other: the model's first. The caller disposes the lease.
    /// </summary>
    public static (ModelLease Lease, TaskResolver Resolver) CreateWithModel(CliContext context, string? modelDirectory, string? registryPath, string? indexPath, ResolverOptions? options = null)
    {
        if ((registryPath is null) == (indexPath is null))
            throw new CliException("give exactly one of --registry FILE or --index FILE.");
        if (registryPath is not null)
        {
            var lease = context.Model(modelDirectory);
            try
            {
                var created = Create(registryPath, null, lease, options);
                WarnIfTunedForAnotherModel(context, created);
                return (lease, created);
            }
            catch { lease.Dispose(); throw; }
        }
        var loading = Task.Run(() => context.Model(modelDirectory));
        TaskIndex? index = null;
        TaskResolver resolver;
        try
        {
            index = LoadIndex(indexPath!, expectedModel: null);
            resolver = FromIndex(index, new DeferredEmbedder(index.Model, loading), options);
        }
        catch
        {
            // The same precedence as loading one after the other: a model error first, then a model mismatch, then
            // whatever was wrong with the index.
            using var failed = loading.GetAwaiter().GetResult();
            if (index is not null) EnsureModel(index, failed);
            throw;
        }
        var loaded = loading.GetAwaiter().GetResult();
        try { EnsureModel(index, loaded); }
        catch { loaded.Dispose(); throw; }
        WarnIfTunedForAnotherModel(context, resolver);
        return (loaded, resolver);
    }

    private static void EnsureModel(TaskIndex index, ModelLease model)
    {
        try { index.EnsureModel(model.Embedder.Model); }
        catch (IndexException e) { throw new CliException(e.Message, ExitCodes.BadInput, e); }
    }

    public static TaskIndex LoadIndex(string path, ModelLease model) => LoadIndex(path, model.Embedder.Model);

    private static TaskIndex LoadIndex(string path, TaskPhrase.Embedding.EmbeddingModelInfo? expectedModel)
    {
        try
        {
            return TaskIndex.Load(path, expectedModel);
        }
        catch (IndexException e)
        {
            throw new CliException(e.Message, ExitCodes.BadInput, e);
        }
        catch (FileNotFoundException e)
        {
            throw new CliException($"{path}: index file not found ({e.Message}).", ExitCodes.BadInput, e);
        }
    }

    public static TaskResolver FromIndex(TaskIndex index, ModelLease model, ResolverOptions? options) => FromIndex(index, model.Embedder, options);

    private static TaskResolver FromIndex(TaskIndex index, Microsoft.Extensions.AI.IEmbeddingGenerator<string, Microsoft.Extensions.AI.Embedding<float>> generator, ResolverOptions? options)
    {
        try
        {
            return TaskResolver.FromIndex(index, generator, options);
        }
        catch (InvalidOperationException e)
        {
            throw new CliException(e.Message, ExitCodes.BadInput, e);
        }
    }
}
