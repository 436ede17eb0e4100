using System.Text.RegularExpressions;
using YamlDotNet.Core;
using YamlDotNet.Core.Events;

namespace TaskPhrase.Registry;

/// <summary>
/// Turns YAML text into a <see cref="RegistryNode"/> tree with YamlDotNet's low-level parser (events with marks),
/// refusing anchors and aliases, tags, more than one document, duplicate keys, deep nesting and too many nodes.
/// No recursion: nesting is tracked on an explicit stack, and reading stops at the first fatal problem, so a
/// hostile file costs no more than the bytes read up to that point.
/// </summary>
internal static partial class YamlTreeReader
{
    private sealed class Frame(RegistryNode node)
    {
        public RegistryNode Node { get; } = node;
        public RegistryNode? PendingKey { get; set; }
    }

    /// <summary>Reads the tree. Returns null after a fatal error (recorded in <paramref name="bag"/>) or for an empty stream.</summary>
    public static RegistryNode? Read(string text, RegistryLoadOptions options, DiagnosticBag bag, out bool fatal)
    {
        fatal = false;
        var parser = new Parser(new StringReader(text));
        var stack = new Stack<Frame>();
        RegistryNode? root = null;
        int documents = 0, nodes = 0;
        var lastEnd = new SourcePosition(1, 1);

        while (true)
        {
            ParsingEvent ev;
            try
            {
                if (!parser.MoveNext()) break;
                ev = parser.Current!;
            }
            catch (YamlException ex)
            {
                bag.Error(RegistryDiagnosticCodes.YamlSyntax, At(ex.Start),
                    $"the YAML is malformed: {CleanMessage(ex.Message)} Fix the syntax at this place (indentation, quotes, brackets).");
                fatal = true;
                return null;
            }
            catch (Exception ex) when (ex is InvalidOperationException or ArgumentException or FormatException or OverflowException)
            {
                // YamlDotNet throws these for some malformed input (e.g. an unterminated flow list at the end).
                bag.Error(RegistryDiagnosticCodes.YamlSyntax, lastEnd,
                    "the YAML is malformed after this place (an unclosed bracket or quote?). Fix the syntax here.");
                fatal = true;
                return null;
            }

            var at = At(ev.Start);
            lastEnd = At(ev.End);
            switch (ev)
            {
                case StreamStart or StreamEnd or DocumentEnd:
                    continue;
                case DocumentStart:
                    if (++documents > 1)
                    {
                        bag.Error(RegistryDiagnosticCodes.MultipleDocuments, at,
                            "a second YAML document starts here ('---'); a registry is one document: remove the separator and merge or split the files.");
                        fatal = true;
                        return null;
                    }
                    continue;
                case AnchorAlias alias:
                    bag.Error(RegistryDiagnosticCodes.AliasNotAllowed, at,
                        $"the YAML alias '*{alias.Value}' is not allowed in a registry; write the value out in full.");
                    fatal = true;
                    return null;
            }

            if (ev is NodeEvent node)
            {
                if (!node.Anchor.IsEmpty)
                {
                    bag.Error(RegistryDiagnosticCodes.AliasNotAllowed, at,
                        $"the YAML anchor '&{node.Anchor}' is not allowed in a registry (anchors and aliases are refused); remove it and write values out in full.");
                    fatal = true;
                    return null;
                }
                if (!node.Tag.IsEmpty)
                {
                    string tag = node.Tag.Value.Replace("tag:yaml.org,2002:", "!!", StringComparison.Ordinal);
                    bag.Error(RegistryDiagnosticCodes.TagNotAllowed, at,
                        $"the explicit YAML tag '{tag}' is not allowed in a registry; remove it (put a value in quotes to make it text).");
                }
                if (++nodes > options.MaxNodes)
                {
                    bag.Error(RegistryDiagnosticCodes.TooManyNodes, at,
                        $"the file holds more than {options.MaxNodes:N0} YAML values (RegistryLoadOptions.MaxNodes); split the registry or raise the limit.");
                    fatal = true;
                    return null;
                }
            }

            switch (ev)
            {
                case Scalar scalar:
                    Attach(new RegistryScalar(at, scalar.Value, scalar.Style == ScalarStyle.Plain), stack, ref root, bag);
                    break;
                case SequenceStart or MappingStart:
                    if (stack.Count + 1 > options.MaxDepth)
                    {
                        bag.Error(RegistryDiagnosticCodes.TooDeep, at,
                            $"lists and mappings are nested more than {options.MaxDepth} deep here (RegistryLoadOptions.MaxDepth); a registry needs 4 levels: check the indentation and brackets.");
                        fatal = true;
                        return null;
                    }
                    stack.Push(new Frame(ev is SequenceStart ? new RegistrySequence(at) : new RegistryMapping(at)));
                    break;
                case SequenceEnd or MappingEnd:
                    var done = stack.Pop();
                    Attach(done.Node, stack, ref root, bag);
                    break;
            }
        }
        return root;
    }

    private static void Attach(RegistryNode node, Stack<Frame> stack, ref RegistryNode? root, DiagnosticBag bag)
    {
        if (stack.Count == 0)
        {
            root = node;
            return;
        }
        var top = stack.Peek();
        switch (top.Node)
        {
            case RegistrySequence sequence:
                sequence.Items.Add(node);
                break;
            case RegistryMapping when top.PendingKey is null:
                top.PendingKey = node;
                break;
            case RegistryMapping mapping:
                AddEntry(mapping, top.PendingKey, node, bag);
                top.PendingKey = null;
                break;
        }
    }

    /// <summary>Adds a key/value pair, refusing non-text keys and duplicate keys (the first one is kept).</summary>
    internal static void AddEntry(RegistryMapping mapping, RegistryNode key, RegistryNode value, DiagnosticBag bag)
    {
        if (key is not RegistryScalar scalarKey || scalarKey.IsNull)
        {
            bag.Error(RegistryDiagnosticCodes.WrongType, key.Position,
                $"a mapping key must be a plain name such as 'phrases', but this one is {key.Describe()}; write 'name: value'.");
            return;
        }
        var first = mapping.FindKey(scalarKey.Value);
        if (first is not null)
        {
            bag.Error(RegistryDiagnosticCodes.DuplicateKey, scalarKey.Position,
                $"the key '{scalarKey.Value}' appears twice in the same mapping (first at {first.Position.Describe()}); keep one of them.");
            return;
        }
        mapping.Entries.Add(new(scalarKey, value));
    }

    private static SourcePosition At(Mark mark) => new((int)Math.Min(mark.Line, int.MaxValue), (int)Math.Min(mark.Column, int.MaxValue));

    /// <summary>YamlDotNet prefixes messages with "(Line: 1, Col: 2, Idx: 1) - (Line: …): "; the diagnostic has the place already.</summary>
    private static string CleanMessage(string message)
    {
        string cleaned = MarkPrefix().Replace(message, "").Trim();
        if (cleaned.Length > 0 && !cleaned.EndsWith('.')) cleaned += ".";
        return cleaned.Length > 0 ? char.ToLowerInvariant(cleaned[0]) + cleaned[1..] : "unexpected content.";
    }

    [GeneratedRegex(@"^\(Line: \d+, Col: \d+, Idx: \d+\) - \(Line: \d+, Col: \d+, Idx: \d+\):\s*")]
    private static partial Regex MarkPrefix();
}
