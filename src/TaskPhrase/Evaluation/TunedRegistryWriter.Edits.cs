using System.Text;
using YamlDotNet.Core;
using YamlDotNet.Core.Events;
using YamlDotNet.RepresentationModel;

namespace TaskPhrase.Evaluation;

public static partial class TunedRegistryWriter
{
    private const string RemovedNote = "  # removed by 'taskphrase tune': the tuned registry-wide value applies";

    /// <summary>Replace the text [Start, End) with Text; insertions have Start == End.</summary>
    private sealed record Edit(int Start, int End, string Text, int Order);

    private sealed class EditContext(string text, string source, string newline)
    {
        public string Text { get; } = text;
        public string Source { get; } = source;
        public string Newline { get; } = newline;
        public List<Edit> Edits { get; } = [];

        public void Add(int start, int end, string replacement) => Edits.Add(new Edit(start, end, replacement, Edits.Count));

        public FormatException Error(Mark at, string message)
            => new($"{Source}:{at.Line}:{at.Column}: {message}");
    }

    private static string Rewrite(string text, TuningResult result, string provenance, string source)
    {
        if (text.Length > 0 && text[0] == '\uFEFF') text = text[1..];
        string newline = text.Contains("\r\n", StringComparison.Ordinal) ? "\r\n" : "\n";
        text = StripHeader(text);
        var root = Parse(text, source);
        var context = new EditContext(text, source, newline);
        EditModel(context, root, result);
        EditDefaults(context, root, result);
        EditScoring(context, root, result);
        EditTasks(context, root, result);

        var sb = new StringBuilder(text);
        foreach (var edit in context.Edits.OrderByDescending(e => e.Start).ThenByDescending(e => e.Order))
        {
            sb.Remove(edit.Start, edit.End - edit.Start).Insert(edit.Start, edit.Text);
        }
        string output = Header(provenance, newline) + sb;
        Verify(output, result, source);
        return output;
    }

    private static YamlMappingNode Parse(string text, string source)
    {
        var stream = new YamlStream();
        try
        {
            stream.Load(new StringReader(text));
        }
        catch (YamlException ex)
        {
            throw new FormatException(
                $"{source}:{ex.Start.Line}:{ex.Start.Column}: the registry is not valid YAML ({ex.Message}); fix it ('taskphrase check' lists the problems) and tune again.", ex);
        }
        if (stream.Documents.Count == 0 || stream.Documents[0].RootNode is not YamlMappingNode root)
        {
            throw new FormatException($"{source}:1:1: the registry must be a YAML mapping with the keys version, defaults and tasks.");
        }
        return root;
    }

    private static void EditDefaults(EditContext c, YamlMappingNode root, TuningResult result)
    {
        string accept = FormatNumber(result.Accept), margin = FormatNumber(result.Margin);
        var value = Find(root, "defaults", out var key);
        switch (value)
        {
            case YamlMappingNode { Style: MappingStyle.Flow } flow:
                RewriteFlowDefaults(c, flow, accept, margin);
                break;
            case YamlMappingNode block:
                SetInBlockMapping(c, block, "accept", accept, beforeCollections: false);
                SetInBlockMapping(c, block, "margin", margin, beforeCollections: false);
                break;
            case YamlScalarNode scalar when IsNull(scalar):
            {
                // "defaults:" with no value (or ~ / null): drop the null and add the two keys below it.
                if (scalar.End.Index > scalar.Start.Index) c.Add(Index(scalar.Start), Index(scalar.End), "");
                string indent = new(' ', Column(key!) + 2);
                int at = LineEnd(c.Text, Index(key!.Start));
                c.Add(at, at, $"{c.Newline}{indent}accept: {accept}{c.Newline}{indent}margin: {margin}");
                break;
            }
            case null:
                InsertDefaultsBlock(c, root, accept, margin);
                break;
            default:
                throw c.Error(value.Start, "'defaults' must be a mapping with the keys accept and margin; correct it and tune again.");
        }
    }

    private static void RewriteFlowDefaults(EditContext c, YamlMappingNode flow, string accept, string margin)
    {
        var parts = new List<string>();
        bool sawAccept = false, sawMargin = false;
        foreach (var (k, v) in flow.Children)
        {
            string name = (k as YamlScalarNode)?.Value ?? "";
            if (name == "accept") { parts.Add($"accept: {accept}"); sawAccept = true; }
            else if (name == "margin") { parts.Add($"margin: {margin}"); sawMargin = true; }
            else parts.Add(c.Text[Index(k.Start)..NodeEnd(c.Text, v)]);
        }
        if (!sawAccept) parts.Add($"accept: {accept}");
        if (!sawMargin) parts.Add($"margin: {margin}");
        c.Add(Index(flow.Start), NodeEnd(c.Text, flow), "{ " + string.Join(", ", parts) + " }");
    }

    private static void InsertDefaultsBlock(EditContext c, YamlMappingNode root, string accept, string margin)
    {
        string indent = new(' ', Column(root.Children.First().Key));
        string block = $"{indent}defaults:{c.Newline}{indent}  accept: {accept}{c.Newline}{indent}  margin: {margin}{c.Newline}";
        // After version/model when present (the order of the design's example), else before tasks, else at the end.
        YamlNode? after = null;
        foreach (string name in new[] { "version", "model" })
        {
            if (Find(root, name, out _) is YamlScalarNode s && (after is null || s.End.Index > after.End.Index)) after = s;
        }
        int at;
        if (after is not null)
        {
            at = NextLineStart(c.Text, Index(after.End));
        }
        else if (Find(root, "tasks", out var tasksKey) is not null)
        {
            at = BackOverComments(c.Text, LineStart(c.Text, Index(tasksKey!.Start)));
        }
        else
        {
            at = c.Text.Length;
        }
        if (at == c.Text.Length && at > 0 && c.Text[^1] != '\n') block = c.Newline + block;
        c.Add(at, at, block);
    }

    /// <summary>
    /// Sets the <c>model</c> key (the model the thresholds were tuned for) to <see cref="TuningResult.ModelId"/>: the
    /// value replaced in place, else the key added after <c>version</c> (block style) or first (flow style, or no
    /// <c>version</c>).
    /// </summary>
    private static void EditModel(EditContext c, YamlMappingNode root, TuningResult result)
    {
        if (result.ModelId is not { Length: > 0 } id) return;
        string text = ModelText(id);
        var value = Find(root, "model", out var key);
        if (key is not null)
        {
            if (value is not YamlScalarNode scalar)
                throw c.Error(value!.Start, "'model' must be a model id (text, e.g. all-minilm-l6-v2); correct it and tune again.");
            if (!IsNull(scalar) && scalar.Value == id) return;
            // An empty value's end mark can lie on the next line (e.g. after a tag); never edit past the key's line.
            int end = Math.Min(NodeEnd(c.Text, scalar), LineEnd(c.Text, Index(key.Start)));
            if (IsNull(scalar)) c.Add(Index(key.Start), end, "model: " + text);
            else c.Add(Index(scalar.Start), Math.Max(end, Index(scalar.Start)), text);
            return;
        }
        if (root.Style == MappingStyle.Flow)
        {
            int open = Index(root.Start) + 1;
            c.Add(open, open, $" model: {text},");
            return;
        }
        string indent = new(' ', Column(root.Children.First().Key));
        int at = Find(root, "version", out _) is YamlScalarNode version
            ? NextLineStart(c.Text, Index(version.End))
            : LineStart(c.Text, Index(root.Children.First().Key.Start));
        string line = $"{indent}model: {text}{c.Newline}";
        if (at == c.Text.Length && at > 0 && c.Text[^1] != '\n') line = c.Newline + line;
        c.Add(at, at, line);
    }

    /// <summary>
    /// A model id as a YAML scalar: plain when it is made of letters, digits and <c>. _ / -</c>, starts with a letter or
    /// digit and is not a null word (<c>null</c>, <c>Null</c>, <c>NULL</c>); else double-quoted, with line separators and
    /// control characters escaped.
    /// </summary>
    private static string ModelText(string id)
    {
        if (id.All(ch => char.IsAsciiLetterOrDigit(ch) || ch is '.' or '_' or '/' or '-') && char.IsAsciiLetterOrDigit(id[0])
            && id is not ("null" or "Null" or "NULL"))
            return id;
        var sb = new StringBuilder("\"");
        foreach (char ch in id)
        {
            if (ch is '"' or '\\') sb.Append('\\').Append(ch);
            else if (char.IsControl(ch) || ch is '\u2028' or '\u2029' or '\u0085') sb.Append($"\\u{(int)ch:x4}");
            else sb.Append(ch);
        }
        return sb.Append('"').ToString();
    }

    /// <summary>
    /// Writes the chosen scoring setting as the root <c>scoring</c> key (replacing the old value, or added before
    /// <c>tasks</c>): the plain name when it has no parameters, else a block mapping with strategy and parameters.
    /// </summary>
    private static void EditScoring(EditContext c, YamlMappingNode root, TuningResult result)
    {
        if (result.Scoring is not { } scoring) return;
        string indent = new(' ', Column(root.Children.First().Key));
        string text = ScoringText(scoring, indent, c.Newline);
        var value = Find(root, "scoring", out var key);
        if (key is not null)
        {
            c.Add(Index(key.Start), NodeEnd(c.Text, value!), text);
            return;
        }
        int at = Find(root, "tasks", out var tasksKey) is not null
            ? BackOverComments(c.Text, LineStart(c.Text, Index(tasksKey!.Start)))
            : c.Text.Length;
        string block = text + c.Newline;
        if (at == c.Text.Length && at > 0 && c.Text[^1] != '\n') block = c.Newline + block;
        c.Add(at, at, block);
    }

    private static string ScoringText(ScoringCandidate scoring, string indent, string newline)
    {
        var p = scoring.Parameters;
        if (p is null || p.IsEmpty) return $"scoring: {scoring.Strategy}";
        var sb = new StringBuilder($"scoring:{newline}{indent}  strategy: {scoring.Strategy}");
        if (p.Shrinkage is { } s) sb.Append($"{newline}{indent}  shrinkage: {ScoringCandidate.Format(s)}");
        if (p.L2 is { } l2) sb.Append($"{newline}{indent}  l2: {ScoringCandidate.Format(l2)}");
        if (p.Temperature is { } t) sb.Append($"{newline}{indent}  temperature: {ScoringCandidate.Format(t)}");
        if (p.ProbabilityWeight is { } w) sb.Append($"{newline}{indent}  probability_weight: {ScoringCandidate.Format(w)}");
        if (p.K is { } k) sb.Append($"{newline}{indent}  k: {k.ToString(System.Globalization.CultureInfo.InvariantCulture)}");
        if (p.CentroidWeight is { } cw) sb.Append($"{newline}{indent}  centroid_weight: {ScoringCandidate.Format(cw)}");
        return sb.ToString();
    }

    private static void EditTasks(EditContext c, YamlMappingNode root, TuningResult result)
    {
        if (Find(root, "tasks", out var tasksKey) is not YamlSequenceNode tasks)
        {
            throw new FormatException($"{c.Source}:{tasksKey?.Start.Line ?? 1}:{tasksKey?.Start.Column ?? 1}: the registry needs a 'tasks' list; correct it and tune again.");
        }
        var seen = new HashSet<string>(StringComparer.Ordinal);
        foreach (var item in tasks.Children)
        {
            if (item is not YamlMappingNode task) throw c.Error(item.Start, "every entry of 'tasks' must be a mapping with an id; correct it and tune again.");
            if (Find(task, "id", out _) is not YamlScalarNode { Value: { Length: > 0 } id })
            {
                throw c.Error(task.Start, "this task has no id; correct it and tune again.");
            }
            seen.Add(id);
            bool hasOverride = result.AcceptOverrides.TryGetValue(id, out float value);
            var acceptNode = Find(task, "accept", out var acceptKey);
            var marginNode = Find(task, "margin", out var marginKey);
            if (!hasOverride && acceptNode is null && marginNode is null) continue;
            if (task.Style == MappingStyle.Flow)
            {
                throw c.Error(task.Start,
                    $"task '{id}' is written in flow style ({{ ... }}); write it as a block mapping (one key per line) so that tune can set its thresholds.");
            }
            if (hasOverride) SetInBlockMapping(c, task, "accept", FormatNumber(value), beforeCollections: true);
            else if (acceptNode is not null) CommentOut(c, acceptKey!, acceptNode, id);
            if (marginNode is not null) CommentOut(c, marginKey!, marginNode, id);
        }
        foreach (string id in result.AcceptOverrides.Keys.Order(StringComparer.Ordinal))
        {
            if (!seen.Contains(id))
            {
                throw new ArgumentException(
                    $"The tuning result has an accept override for task '{id}', which {c.Source} does not define; tune with the probes of this registry.", nameof(result));
            }
        }
    }

    /// <summary>Sets key: value in a block mapping, replacing the value when present, else adding a line.</summary>
    private static void SetInBlockMapping(EditContext c, YamlMappingNode map, string key, string value, bool beforeCollections)
    {
        var existing = Find(map, key, out _);
        if (existing is YamlScalarNode scalar)
        {
            c.Add(Index(scalar.Start), Index(scalar.End), value);
            return;
        }
        if (existing is not null) throw c.Error(existing.Start, $"'{key}' must be a number; correct it and tune again.");
        var entries = map.Children.ToList();
        string line = $"{new string(' ', Column(entries[0].Key))}{key}: {value}{c.Newline}";
        int at = -1;
        if (beforeCollections)
        {
            // Before the first key holding a list or mapping (controller, phrases), as in the design's example.
            int first = entries.FindIndex(e => e.Value is YamlMappingNode or YamlSequenceNode);
            if (first > 0) at = BackOverComments(c.Text, LineStart(c.Text, Index(entries[first].Key.Start)));
        }
        if (at < 0) at = AfterLastContent(c.Text, entries[^1].Value);
        if (at == c.Text.Length && at > 0 && c.Text[^1] != '\n') line = c.Newline + line;
        c.Add(at, at, line);
    }

    /// <summary>Turns a one-line "key: value" entry into a comment that says why.</summary>
    private static void CommentOut(EditContext c, YamlNode key, YamlNode value, string taskId)
    {
        if (value.End.Line != key.Start.Line || value is not YamlScalarNode)
        {
            throw c.Error(key.Start, $"the per-task threshold of task '{taskId}' spans several lines; write it as 'key: number' on one line and tune again.");
        }
        int start = Index(key.Start);
        c.Add(start, start, "# ");
        int end = LineEnd(c.Text, start);
        c.Add(end, end, RemovedNote);
    }

    private static void Verify(string output, TuningResult result, string source)
    {
        var root = Parse(output, source + " (tuned copy)");
        string Problem(string what) => $"Internal error: the tuned copy of {source} {what}. Please report this with the registry file.";
        if (result.ModelId is { Length: > 0 } tunedWith && (Find(root, "model", out _) is not YamlScalarNode written || IsNull(written) || written.Value != tunedWith))
            throw new InvalidOperationException(Problem($"does not name the model '{tunedWith}' it was tuned with"));
        if (Find(root, "defaults", out _) is not YamlMappingNode defaults
            || (Find(defaults, "accept", out _) as YamlScalarNode)?.Value != FormatNumber(result.Accept)
            || (Find(defaults, "margin", out _) as YamlScalarNode)?.Value != FormatNumber(result.Margin))
        {
            throw new InvalidOperationException(Problem("does not hold the tuned defaults"));
        }
        if (result.Scoring is { } scoring)
        {
            var node = Find(root, "scoring", out _);
            var p = scoring.Parameters;
            bool ok = p is null || p.IsEmpty
                ? (node as YamlScalarNode)?.Value == scoring.Strategy
                : node is YamlMappingNode m
                    && (Find(m, "strategy", out _) as YamlScalarNode)?.Value == scoring.Strategy
                    && (Find(m, "shrinkage", out _) as YamlScalarNode)?.Value == (p.Shrinkage is { } s ? ScoringCandidate.Format(s) : null)
                    && (Find(m, "l2", out _) as YamlScalarNode)?.Value == (p.L2 is { } l ? ScoringCandidate.Format(l) : null)
                    && (Find(m, "temperature", out _) as YamlScalarNode)?.Value == (p.Temperature is { } t ? ScoringCandidate.Format(t) : null)
                    && (Find(m, "probability_weight", out _) as YamlScalarNode)?.Value == (p.ProbabilityWeight is { } w ? ScoringCandidate.Format(w) : null)
                    && (Find(m, "k", out _) as YamlScalarNode)?.Value == p.K?.ToString(System.Globalization.CultureInfo.InvariantCulture)
                    && (Find(m, "centroid_weight", out _) as YamlScalarNode)?.Value == (p.CentroidWeight is { } cw ? ScoringCandidate.Format(cw) : null);
            if (!ok) throw new InvalidOperationException(Problem("does not hold the chosen scoring setting"));
        }
        if (Find(root, "tasks", out _) is not YamlSequenceNode tasks) throw new InvalidOperationException(Problem("lost its task list"));
        foreach (var task in tasks.Children.OfType<YamlMappingNode>())
        {
            string id = (Find(task, "id", out _) as YamlScalarNode)?.Value ?? "";
            string? accept = (Find(task, "accept", out _) as YamlScalarNode)?.Value;
            string? expected = result.AcceptOverrides.TryGetValue(id, out float v) ? FormatNumber(v) : null;
            if (accept != expected || Find(task, "margin", out _) is not null)
            {
                throw new InvalidOperationException(Problem($"has wrong per-task thresholds for task '{id}'"));
            }
        }
    }

    private static string Header(string provenance, string newline)
    {
        var sb = new StringBuilder();
        sb.Append(HeaderStart).Append(newline);
        foreach (string line in provenance.Split('\n'))
        {
            string l = line.TrimEnd('\r', ' ');
            sb.Append(l.Length == 0 ? "#" : "# " + l).Append(newline);
        }
        sb.Append("# ").Append(Warning).Append(newline);
        sb.Append(HeaderEnd).Append(newline);
        return sb.ToString();
    }

    /// <summary>Removes an earlier tune comment block from the top of the text.</summary>
    private static string StripHeader(string text)
    {
        if (!text.StartsWith(HeaderStart, StringComparison.Ordinal)) return text;
        int pos = 0;
        while (pos < text.Length)
        {
            int end = LineEnd(text, pos);
            string line = text[pos..end].TrimEnd('\r');
            int next = NextLineStart(text, pos);
            if (line == HeaderEnd) return text[next..];
            if (!line.StartsWith('#')) break;
            pos = next;
        }
        return text;
    }

    private static YamlNode? Find(YamlMappingNode map, string key, out YamlNode? keyNode)
    {
        foreach (var (k, v) in map.Children)
        {
            if (k is YamlScalarNode { Value: var name } && name == key)
            {
                keyNode = k;
                return v;
            }
        }
        keyNode = null;
        return null;
    }

    private static bool IsNull(YamlScalarNode s)
        => s.Style == ScalarStyle.Plain && s.Value is null or "" or "~" or "null" or "Null" or "NULL";

    private static int Index(Mark mark) => checked((int)mark.Index);

    /// <summary>
    /// Where a node's text ends. YamlDotNet reports a collection's marks at its opening token only, so block
    /// collections end where their last child ends and flow collections at their matching closing bracket.
    /// </summary>
    private static int NodeEnd(string text, YamlNode node)
    {
        switch (node)
        {
            case YamlMappingNode { Style: MappingStyle.Flow }:
            case YamlSequenceNode { Style: SequenceStyle.Flow }:
                return FlowEnd(text, Index(node.Start));
            case YamlMappingNode map when map.Children.Count > 0:
                return NodeEnd(text, map.Children.Last().Value);
            case YamlSequenceNode seq when seq.Children.Count > 0:
                return NodeEnd(text, seq.Children[^1]);
            default:
                return Index(node.End);
        }
    }

    /// <summary>The index just after the bracket that closes the flow collection opening at <paramref name="open"/>.</summary>
    private static int FlowEnd(string text, int open)
    {
        int depth = 0;
        for (int i = open; i < text.Length; i++)
        {
            char ch = text[i];
            if (ch is '{' or '[') depth++;
            else if (ch is '}' or ']')
            {
                if (--depth == 0) return i + 1;
            }
            else if (ch == '\'' || ch == '"')
            {
                // Skip a quoted scalar: '' escapes a single quote, backslash escapes inside double quotes.
                for (i++; i < text.Length; i++)
                {
                    if (ch == '"' && text[i] == '\\') { i++; continue; }
                    if (text[i] == ch)
                    {
                        if (ch == '\'' && i + 1 < text.Length && text[i + 1] == '\'') { i++; continue; }
                        break;
                    }
                }
            }
            else if (ch == '#' && i > 0 && char.IsWhiteSpace(text[i - 1]))
            {
                i = LineEnd(text, i) - 1; // a comment inside a multi-line flow collection
            }
        }
        return text.Length;
    }

    private static int Column(YamlNode node) => checked((int)node.Start.Column - 1);

    private static int LineStart(string text, int index)
    {
        while (index > 0 && text[index - 1] != '\n') index--;
        return index;
    }

    private static int LineEnd(string text, int index)
    {
        while (index < text.Length && text[index] != '\n' && text[index] != '\r') index++;
        return index;
    }

    private static int NextLineStart(string text, int index)
    {
        int end = LineEnd(text, index);
        if (end < text.Length && text[end] == '\r') end++;
        if (end < text.Length && text[end] == '\n') end++;
        return end;
    }

    /// <summary>From a line start, moves up over comment lines directly above (they belong to the line below).</summary>
    private static int BackOverComments(string text, int lineStart)
    {
        while (lineStart > 0)
        {
            int previous = LineStart(text, lineStart - 1);
            string line = text[previous..lineStart].Trim();
            if (line.Length == 0 || !line.StartsWith('#')) break;
            lineStart = previous;
        }
        return lineStart;
    }

    /// <summary>The start of the line after the last content line of a node (blank and comment lines after it skipped back over).</summary>
    private static int AfterLastContent(string text, YamlNode lastValue)
    {
        int end = NodeEnd(text, lastValue);
        int start = LineStart(text, end);
        if (text[start..end].Trim().Length > 0) return NextLineStart(text, end); // the node ends on a content line
        // The node ended before this line's content: step back over blank and comment lines.
        while (start > 0)
        {
            int previous = LineStart(text, start - 1);
            string line = text[previous..start].Trim();
            if (line.Length != 0 && !line.StartsWith('#')) break;
            start = previous;
        }
        return start;
    }
}
