using Spectre.Console;
using TaskPhrase.Evaluation;
using TaskPhrase.Resolution;

namespace TaskPhrase.Cli;

/// <summary>Loads a probe suite and resolves all of it in batches, with a progress bar on a terminal.</summary>
internal static class ProbeRunner
{
    public static ProbeSuite LoadSuite(string path, TaskPhrase.Registry.TaskRegistry registry)
    {
        ProbeSuite suite;
        try
        {
            suite = ProbeSuite.Load(path);
        }
        catch (ProbeSuiteException e)
        {
            // One "error:" line per problem (the exception's own message has a heading line and unprefixed rows).
            throw new CliException(string.Join(Environment.NewLine + "error: ", e.Errors.Select(p => p.ToString())), ExitCodes.BadInput, e);
        }
        catch (FileNotFoundException)
        {
            throw new CliException($"{path}: probe suite not found.");
        }
        var problems = suite.Validate(registry.Tasks.Select(t => t.Id).ToArray());
        if (problems.Count > 0)
            throw new CliException(string.Join(Environment.NewLine + "error: ", problems.Select(p => p.ToString())));
        return suite;
    }

    public static IReadOnlyList<Resolution.Resolution> ResolveAll(CliContext context, TaskResolver resolver, IReadOnlyList<ProbeCase> cases)
    {
        var texts = cases.Select(c => c.Utterance).ToList();
        const int chunk = 64;
        var results = new List<Resolution.Resolution>(texts.Count);
        if (!context.Interactive || texts.Count <= chunk)
        {
            foreach (var part in texts.Chunk(chunk)) results.AddRange(resolver.ResolveMany(part));
            return results;
        }
        context.Console(context.Err).Progress().Start(progress =>
        {
            var task = progress.AddTask($"resolving {texts.Count} probes", maxValue: texts.Count);
            foreach (var part in texts.Chunk(chunk))
            {
                results.AddRange(resolver.ResolveMany(part));
                task.Increment(part.Length);
            }
        });
        return results;
    }
}
