using System.CommandLine;
using System.Text.Json;
using Spectre.Console;
using TaskPhrase.Resolution;

namespace TaskPhrase.Cli.Commands;

/// <summary>
/// <c>taskphrase resolve</c>: resolves utterances given as arguments, read from <c>--input</c>, or typed at a prompt.
/// A rejection is a normal outcome (exit 0).
/// </summary>
internal static class ResolveCommand
{
    public static Command Create(CliContext context)
    {
        var utterances = new Argument<string[]>("utterance") { Description = "Utterances to resolve; none (on a terminal) starts a prompt.", Arity = ArgumentArity.ZeroOrMore };
        var registry = CommonOptions.Registry();
        var index = CommonOptions.Index();
        var input = CommonOptions.Input();
        var json = CommonOptions.Json();
        var model = CommonOptions.Model();
        var film = CommonOptions.Film();
        var command = new Command("resolve", "Resolve utterances to approved tasks, or refuse them with a reason.")
        {
            utterances, registry, index, input, json, model, film,
        };
        command.SetAction(parse => CliRunner.Run(context, parse, () =>
        {
            var given = (parse.GetValue(utterances) ?? []).ToList();
            string? inputPath = parse.GetValue(input);
            bool asJson = parse.GetValue(json);
            if (given.Count == 0 && inputPath is null && !context.Interactive)
                throw new CliException("resolve: give utterances as arguments, --input FILE (- for standard input), or run it on a terminal for a prompt.");
            var (lease, resolver) = ResolverFactory.CreateWithModel(context, parse.GetValue(model), parse.GetValue(registry), parse.GetValue(index));
            using var _ = lease;
            if (parse.GetValue(film) is { } filmPath) FilmSupport.Attach(filmPath, resolver);

            if (given.Count > 0 || inputPath is not null)
            {
                var texts = given.Concat(inputPath is null ? [] : InputLines.Read(inputPath, context).Select(l => l.Text)).ToList();
                foreach (var chunk in texts.Chunk(256))
                {
                    foreach (var r in resolver.ResolveMany(chunk))
                        Print(context, r, asJson);
                }
                return ExitCodes.Success;
            }

            var console = context.Console();
            console.MarkupLine($"[grey]registry {resolver.Registry.ContentHash[..12]} · model {resolver.Model.Id} · empty line or Ctrl-D to quit[/]");
            using var reader = new StreamReader(context.OpenStdin());
            while (true)
            {
                console.Markup("[bold]> [/]");
                string? line = reader.ReadLine();
                if (string.IsNullOrEmpty(line)) return ExitCodes.Success;
                var r = resolver.Resolve(line);
                Print(context, r, asJson);
            }
        }));
        return command;
    }

    internal static void Print(CliContext context, Resolution.Resolution r, bool asJson)
    {
        if (asJson)
        {
            context.Out.WriteLine(ResolutionJson.ToJson(r));
            return;
        }
        string score = r.Score is { } s ? $"{s:0.000}" : "-";
        string margin = r.Margin is { } m ? $"{m:0.000}" : "-";
        string outcome = ResolutionJson.Name(r.Outcome);
        string utterance = Printable(r.Utterance);
        string target = r.Outcome == ResolutionOutcome.Accepted
            ? $"{r.Task!.Id} ({r.Task.Controller.Manifold}, {r.Task.Controller.LatentDims} axes)"
            : $"{ResolutionJson.Name(r.Reason)}{(r.Task is null ? "" : $"; nearest {r.Task.Id}")}";
        string tail = $"score {score} margin {margin}{(r.Truncated ? " TRUNCATED" : "")}";
        string? note = r.Detail is { } detail && r.Outcome != ResolutionOutcome.Accepted ? detail
            : r.Outcome == ResolutionOutcome.Accepted && r.Corrections.Count > 0 ? $"corrected: {Printable(string.Join("; ", r.Corrections))}"
            : null;
        if (!context.Interactive)
        {
            // Redirected output has no colour: plain text, the same words, without setting up a console renderer
            // (about a tenth of a cold start's time).
            context.Out.WriteLine($"{outcome} {utterance} → {target}{(r.Confirm && r.Outcome == ResolutionOutcome.Accepted ? " CONFIRM FIRST" : "")}  {tail}");
            if (note is not null) context.Out.WriteLine($"  {note}");
            return;
        }
        var console = context.Console();
        string color = r.Outcome switch { ResolutionOutcome.Accepted => "green", ResolutionOutcome.Ambiguous => "yellow", _ => "red" };
        string confirm = r.Confirm && r.Outcome == ResolutionOutcome.Accepted ? " [bold]CONFIRM FIRST[/]" : "";
        console.MarkupLine($"[{color}]{outcome}[/] {Markup.Escape(utterance)} → {Markup.Escape(target)}{confirm}  [grey]{Markup.Escape(tail)}[/]");
        if (note is not null) console.MarkupLine($"  [grey]{Markup.Escape(note)}[/]");
    }

    /// <summary>
    /// The utterance as shown on a terminal: control and format characters (escape sequences, bidi overrides) and
    /// broken surrogates are written as <c>\uXXXX</c>, so that typed or piped input cannot drive the terminal.
    /// </summary>
    internal static string Printable(string text)
    {
        var sb = new System.Text.StringBuilder(text.Length);
        for (int i = 0; i < text.Length; i++)
        {
            char c = text[i];
            if (char.IsHighSurrogate(c) && i + 1 < text.Length && char.IsLowSurrogate(text[i + 1]))
            {
                sb.Append(c).Append(text[++i]);
                continue;
            }
            var category = char.GetUnicodeCategory(c);
            if (char.IsSurrogate(c) || category is System.Globalization.UnicodeCategory.Control or System.Globalization.UnicodeCategory.Format)
                sb.Append($"\\u{(int)c:X4}");
            else
                sb.Append(c);
        }
        return sb.ToString();
    }
}
