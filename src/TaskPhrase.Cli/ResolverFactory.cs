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

    public static TaskIndex LoadIndex(string path, ModelLease model)
    {
        try
        {
            return TaskIndex.Load(path, model.Embedder.Model);
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

    public static TaskResolver FromIndex(TaskIndex index, ModelLease model, ResolverOptions? options)
    {
        try
        {
            return TaskResolver.FromIndex(index, model.Embedder, options);
        }
        catch (InvalidOperationException e)
        {
            throw new CliException(e.Message, ExitCodes.BadInput, e);
        }
    }
}
