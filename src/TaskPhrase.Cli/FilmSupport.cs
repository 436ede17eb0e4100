using TaskPhrase.Conditioning;
using TaskPhrase.Resolution;

namespace TaskPhrase.Cli;

/// <summary>Attaches FiLM conditioning to a resolver (<c>resolve --film FILE</c>, <c>build --film FILE</c>).</summary>
internal static class FilmSupport
{
    public static FilmGenerator Load(string path, int dimensions)
    {
        try
        {
            return FilmGenerator.Load(path, dimensions);
        }
        catch (Exception e) when (e is SafeTensorsException or InvalidDataException or FileNotFoundException)
        {
            throw new CliException(e.Message, ExitCodes.BadInput, e);
        }
    }

    public static void Attach(string path, TaskResolver resolver) => resolver.UseConditioning(Load(path, resolver.Model.Dimensions));
}
