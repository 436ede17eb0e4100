using System.Globalization;
using System.Text.RegularExpressions;
using TaskPhrase.Text;

namespace TaskPhrase.Registry;

/// <summary>
/// Checks a <see cref="RegistryNode"/> tree against the registry format (version 1) and builds the parts of a
/// <see cref="TaskRegistry"/>. Collects every error it can find in one pass; stops early only for an unknown
/// version (the rest of the file may follow another format) and for the task and phrase limits.
/// </summary>
internal sealed partial class RegistryValidator
{
    internal static readonly string[] RootKeys = ["version", "model", "defaults", "scoring", "hazard_words", "allow_words", "tasks"];
    internal static readonly string[] DefaultsKeys = ["accept", "margin"];
    internal static readonly string[] TaskKeys = ["id", "title", "confirm", "accept", "margin", "controller", "phrases", "must_reject", "also_words"];
    internal static readonly string[] ControllerKeys = ["manifold", "latent_dims", "decoder"];

    /// <summary>The scoring strategy names a registry may give.</summary>
    internal static readonly string[] ScoringNames = ["best-phrase", "centroid", "top-k", "blend", "whitened", "head"];

    /// <summary>The validated content of a registry, ready to be hashed.</summary>
    internal sealed record Parts(IReadOnlyList<TaskDefinition> Tasks, RegistryDefaults Defaults, string? ModelId, RegistrySettings Settings);

    private sealed record PhraseSite(int TaskIndex, string TaskLabel, string Text, SourcePosition Position);

    private readonly DiagnosticBag _bag;
    private readonly RegistryLoadOptions _options;
    private readonly Dictionary<string, PhraseSite> _approved = new(StringComparer.Ordinal);
    private readonly List<(string Key, PhraseSite Site)> _mustReject = [];
    private readonly Dictionary<string, SourcePosition> _ids = new(StringComparer.Ordinal);
    private int _phraseCount;
    private bool _phraseLimitHit;

    private RegistryValidator(DiagnosticBag bag, RegistryLoadOptions options)
    {
        _bag = bag;
        _options = options;
    }

    /// <summary>Validates <paramref name="root"/>; returns the parts, or null when any error was recorded.</summary>
    public static Parts? Validate(RegistryNode? root, RegistryLoadOptions options, DiagnosticBag bag)
        => new RegistryValidator(bag, options).Run(root);

    private Parts? Run(RegistryNode? root)
    {
        if (root is null || root is RegistryScalar { IsNull: true })
        {
            _bag.Error(RegistryDiagnosticCodes.EmptyRegistry, new SourcePosition(1, 1),
                "the file holds no registry; start it with 'version: 1' followed by a 'tasks' list.");
            return null;
        }
        if (root is not RegistryMapping map)
        {
            _bag.Error(RegistryDiagnosticCodes.WrongType, root.Position,
                $"a registry must be a mapping with the keys 'version' and 'tasks', but this file holds {root.Describe()}.");
            return null;
        }
        if (!ReadVersion(map)) return null; // another version may have other keys: report nothing else
        CheckKeys(map, RootKeys, "the registry");

        string? modelId = ReadOptionalText(map, "model", "the registry", "name the model the thresholds were tuned for, e.g. all-minilm-l6-v2", normalize: true);
        var defaults = ReadDefaults(map);
        var (scoring, scoringParameters) = ReadScoring(map);
        var hazardWords = ReadWordList(map, "hazard_words", "the registry");
        var allowWords = ReadWordList(map, "allow_words", "the registry");
        var tasks = ReadTasks(map);
        CheckMustReject();

        if (_bag.HasErrors) return null;
        var settings = new RegistrySettings { Scoring = scoring, ScoringParameters = scoringParameters, HazardWords = hazardWords, AllowWords = allowWords };
        return new Parts(tasks, defaults, modelId, settings);
    }

    private bool ReadVersion(RegistryMapping map)
    {
        if (!map.TryGet("version", out var key, out var value))
        {
            _bag.Error(RegistryDiagnosticCodes.MissingVersion, map.Position,
                "the registry has no 'version'; add 'version: 1' as its first line.");
            return true;
        }
        switch (value)
        {
            case RegistryScalar { IsNull: true }:
                _bag.Error(RegistryDiagnosticCodes.MissingVersion, key.Position, "'version' is empty; write 'version: 1'.");
                return true;
            case RegistryScalar s when s.IsPlain && TryParseInt(s.Value, out int v) && v == 1:
                return true;
            case RegistryScalar s:
                _bag.Error(RegistryDiagnosticCodes.UnknownVersion, s.Position,
                    $"registry version {s.Describe()} is not known: this TaskPhrase reads version 1 only; write 'version: 1' or use the TaskPhrase release that matches the file.");
                return false;
            default:
                _bag.Error(RegistryDiagnosticCodes.WrongType, value.Position,
                    $"'version' must be the number 1, but is {value.Describe()}.");
                return true;
        }
    }

    private RegistryDefaults ReadDefaults(RegistryMapping map)
    {
        var standard = RegistryDefaults.Standard;
        if (!map.TryGet("defaults", out _, out var value) || value is RegistryScalar { IsNull: true }) return standard;
        if (value is not RegistryMapping defaults)
        {
            _bag.Error(RegistryDiagnosticCodes.WrongType, value.Position,
                $"'defaults' must be a mapping with 'accept' and 'margin', but is {value.Describe()}.");
            return standard;
        }
        CheckKeys(defaults, DefaultsKeys, "'defaults'");
        float accept = ReadThreshold(defaults, "accept", "'defaults'") ?? standard.Accept;
        float margin = ReadThreshold(defaults, "margin", "'defaults'") ?? standard.Margin;
        return new RegistryDefaults(accept, margin);
    }

    private List<TaskDefinition> ReadTasks(RegistryMapping map)
    {
        var tasks = new List<TaskDefinition>();
        if (!map.TryGet("tasks", out var key, out var value))
        {
            _bag.Error(RegistryDiagnosticCodes.MissingTasks, map.Position,
                "the registry has no 'tasks'; add a 'tasks:' list with at least one task.");
            return tasks;
        }
        if (value is RegistryScalar { IsNull: true } || value is RegistrySequence { Items.Count: 0 })
        {
            _bag.Error(RegistryDiagnosticCodes.NoTasks, value is RegistryScalar ? key.Position : value.Position,
                "the 'tasks' list is empty; add at least one task with id, title, controller and phrases.");
            return tasks;
        }
        if (value is not RegistrySequence list)
        {
            _bag.Error(RegistryDiagnosticCodes.WrongType, value.Position,
                $"'tasks' must be a list of tasks (each starting with '- id: ...'), but is {value.Describe()}.");
            return tasks;
        }
        for (int i = 0; i < list.Items.Count; i++)
        {
            if (i >= _options.MaxTasks)
            {
                _bag.Error(RegistryDiagnosticCodes.TooManyTasks, list.Items[i].Position,
                    $"the registry has more than {_options.MaxTasks:N0} tasks (RegistryLoadOptions.MaxTasks); this is task {i + 1}: split the registry or raise the limit.");
                break;
            }
            var task = ReadTask(list.Items[i], i);
            if (task is not null) tasks.Add(task);
            if (_phraseLimitHit) break;
        }
        return tasks;
    }

    private TaskDefinition? ReadTask(RegistryNode node, int index)
    {
        if (node is not RegistryMapping map)
        {
            _bag.Error(RegistryDiagnosticCodes.WrongType, node.Position,
                $"each entry of 'tasks' must be a mapping with id, title, controller and phrases, but entry {index + 1} is {node.Describe()}.");
            return null;
        }
        string? id = ReadId(map, index);
        string owner = id is null ? $"task {index + 1}" : $"task {id}";
        CheckKeys(map, TaskKeys, owner);

        string? title = ReadRequiredText(map, "title", owner, RegistryDiagnosticCodes.MissingTitle, "add a short human-readable title");
        bool confirm = ReadOptionalBool(map, "confirm", owner) ?? false;
        float? accept = ReadThreshold(map, "accept", owner);
        float? margin = ReadThreshold(map, "margin", owner);
        var controller = ReadController(map, owner);
        var phrases = ReadPhrases(map, index, owner);
        var mustReject = ReadMustReject(map, index, owner);
        var alsoWords = ReadWordList(map, "also_words", owner);

        if (id is null || title is null || controller is null || phrases is null) return null;
        return new TaskDefinition
        {
            Id = id,
            Title = title,
            Confirm = confirm,
            Accept = accept,
            Margin = margin,
            Controller = controller,
            Phrases = phrases,
            MustReject = mustReject,
            AlsoWords = alsoWords,
        };
    }

    private string? ReadId(RegistryMapping map, int index)
    {
        const string hint = "give a kebab-case id such as 'water-basil'";
        if (!map.TryGet("id", out var key, out var value))
        {
            _bag.Error(RegistryDiagnosticCodes.MissingId, map.Position, $"task {index + 1} has no 'id'; {hint}.");
            return null;
        }
        if (value is not RegistryScalar s)
        {
            _bag.Error(RegistryDiagnosticCodes.WrongType, value.Position, $"'id' of task {index + 1} must be text, but is {value.Describe()}; {hint}.");
            return null;
        }
        if (s.IsNull || s.Value.Length == 0)
        {
            _bag.Error(RegistryDiagnosticCodes.MissingId, key.Position, $"'id' of task {index + 1} is empty; {hint}.");
            return null;
        }
        if (!KebabCase().IsMatch(s.Value))
        {
            _bag.Error(RegistryDiagnosticCodes.BadId, s.Position,
                $"'{Shorten(s.Value)}' is not a kebab-case id: use lower-case letters and digits, in words joined by single hyphens (e.g. 'water-basil').");
            return null;
        }
        if (_ids.TryGetValue(s.Value, out var first))
        {
            _bag.Error(RegistryDiagnosticCodes.DuplicateId, s.Position,
                $"the task id '{s.Value}' is already used by the task at {first.Describe()}; ids must be unique: rename one of them.");
            return null;
        }
        _ids.Add(s.Value, s.Position);
        return s.Value;
    }

    private ControllerBinding? ReadController(RegistryMapping task, string owner)
    {
        const string hint = "add 'controller:' with 'manifold' (the learned controller's id) and 'latent_dims'";
        if (!task.TryGet("controller", out var key, out var value))
        {
            _bag.Error(RegistryDiagnosticCodes.MissingController, task.Position, $"{owner} has no 'controller'; {hint}.");
            return null;
        }
        if (value is RegistryScalar { IsNull: true })
        {
            _bag.Error(RegistryDiagnosticCodes.MissingController, key.Position, $"'controller' of {owner} is empty; {hint}.");
            return null;
        }
        if (value is not RegistryMapping map)
        {
            _bag.Error(RegistryDiagnosticCodes.WrongType, value.Position,
                $"'controller' of {owner} must be a mapping with 'manifold' and 'latent_dims', but is {value.Describe()}.");
            return null;
        }
        string where = $"the controller of {owner}";
        CheckKeys(map, ControllerKeys, where);
        string? manifold = ReadRequiredText(map, "manifold", where, RegistryDiagnosticCodes.MissingManifold,
            "give the id of the learned controller in the host app, e.g. 'pour-arc.v2'");
        int? latentDims = ReadLatentDims(map, where);
        string? decoder = ReadOptionalText(map, "decoder", where, "give the decoder file's path", normalize: false);
        if (manifold is null || latentDims is null) return null;
        return new ControllerBinding(manifold, latentDims.Value, decoder);
    }

    private int? ReadLatentDims(RegistryMapping map, string owner)
    {
        const string hint = "give the number of joystick axes the controller takes, at least 1";
        if (!map.TryGet("latent_dims", out var key, out var value))
        {
            _bag.Error(RegistryDiagnosticCodes.MissingLatentDims, map.Position, $"{owner} has no 'latent_dims'; {hint}.");
            return null;
        }
        if (value is RegistryScalar { IsNull: true })
        {
            _bag.Error(RegistryDiagnosticCodes.MissingLatentDims, key.Position, $"'latent_dims' of {owner} is empty; {hint}.");
            return null;
        }
        if (value is not RegistryScalar { IsPlain: true } s || !TryParseInt(s.Value, out int dims))
        {
            _bag.Error(RegistryDiagnosticCodes.WrongType, value.Position,
                $"'latent_dims' of {owner} must be a whole number, but is {value.Describe()}; {hint}.");
            return null;
        }
        if (dims < 1)
        {
            _bag.Error(RegistryDiagnosticCodes.BadLatentDims, s.Position, $"'latent_dims' of {owner} is {dims}; {hint}.");
            return null;
        }
        return dims;
    }

    private List<string>? ReadPhrases(RegistryMapping task, int taskIndex, string owner)
    {
        const string hint = "list at least one approved wording, one per '- ' line";
        if (!task.TryGet("phrases", out var key, out var value))
        {
            _bag.Error(RegistryDiagnosticCodes.MissingPhrases, task.Position, $"{owner} has no 'phrases'; {hint}.");
            return null;
        }
        if (value is RegistryScalar { IsNull: true } || value is RegistrySequence { Items.Count: 0 })
        {
            _bag.Error(RegistryDiagnosticCodes.EmptyPhrases, value is RegistryScalar ? key.Position : value.Position,
                $"'phrases' of {owner} is empty; {hint}.");
            return null;
        }
        if (value is not RegistrySequence list)
        {
            _bag.Error(RegistryDiagnosticCodes.WrongType, value.Position,
                $"'phrases' of {owner} must be a list, but is {value.Describe()}; {hint}.");
            return null;
        }
        var phrases = new List<string>(list.Items.Count);
        foreach (var item in list.Items)
        {
            if (!CountPhrase(item.Position)) break;
            string? text = ReadItemText(item, "phrases", owner, RegistryDiagnosticCodes.EmptyPhrase);
            if (text is null) continue;
            string matchKey = TextNormalizer.MatchKey(text);
            var site = new PhraseSite(taskIndex, owner, text, item.Position);
            if (matchKey.Length == 0)
            {
                _bag.Error(RegistryDiagnosticCodes.EmptyPhrase, item.Position,
                    $"a phrase of {owner} is only punctuation ('{Shorten(text)}'); write a wording or remove the line.");
                continue;
            }
            if (_approved.TryGetValue(matchKey, out var first))
            {
                string message = first.TaskIndex == taskIndex
                    ? $"the phrase '{Shorten(text)}' appears twice in {owner} (first at {first.Position.Describe()} as '{Shorten(first.Text)}'); the same normalised phrase twice is an error: remove one."
                    : $"the phrase '{Shorten(text)}' of {owner} (at {item.Position.Describe()}) is the same after normalisation as '{Shorten(first.Text)}' of {first.TaskLabel} (at {first.Position.Describe()}); a phrase may belong to one task only: remove it from one of them.";
                _bag.Error(RegistryDiagnosticCodes.DuplicatePhrase, item.Position, message);
                continue;
            }
            _approved.Add(matchKey, site);
            phrases.Add(text);
        }
        return phrases;
    }

    private List<string> ReadMustReject(RegistryMapping task, int taskIndex, string owner)
    {
        var result = new List<string>();
        var list = ReadOptionalList(task, "must_reject", owner, "list look-alike wordings, one per '- ' line");
        if (list is null) return result;
        var seen = new Dictionary<string, SourcePosition>(StringComparer.Ordinal);
        foreach (var item in list.Items)
        {
            if (!CountPhrase(item.Position)) break;
            string? text = ReadItemText(item, "must_reject", owner, RegistryDiagnosticCodes.EmptyPhrase);
            if (text is null) continue;
            string matchKey = TextNormalizer.MatchKey(text);
            if (matchKey.Length == 0)
            {
                _bag.Error(RegistryDiagnosticCodes.EmptyPhrase, item.Position,
                    $"a must_reject phrase of {owner} is only punctuation ('{Shorten(text)}'); write a wording or remove the line.");
                continue;
            }
            if (seen.TryGetValue(matchKey, out var first))
            {
                _bag.Warning(RegistryDiagnosticCodes.DuplicateMustReject, item.Position,
                    $"the must_reject phrase '{Shorten(text)}' appears twice in {owner} (first at {first.Describe()}); remove one.");
                continue;
            }
            seen.Add(matchKey, item.Position);
            _mustReject.Add((matchKey, new PhraseSite(taskIndex, owner, text, item.Position)));
            result.Add(text);
        }
        return result;
    }

    private void CheckMustReject()
    {
        foreach (var (key, site) in _mustReject)
        {
            if (!_approved.TryGetValue(key, out var approved)) continue;
            _bag.Error(RegistryDiagnosticCodes.MustRejectEqualsPhrase, site.Position,
                $"the must_reject phrase '{Shorten(site.Text)}' of {site.TaskLabel} is the same after normalisation as the approved phrase '{Shorten(approved.Text)}' of {approved.TaskLabel} (at {approved.Position.Describe()}); a wording cannot be both approved and refused: remove one of them.");
        }
    }

    private bool CountPhrase(SourcePosition at)
    {
        if (_phraseLimitHit) return false;
        if (++_phraseCount <= _options.MaxPhrases) return true;
        _phraseLimitHit = true;
        _bag.Error(RegistryDiagnosticCodes.TooManyPhrases, at,
            $"the registry has more than {_options.MaxPhrases:N0} phrases (approved and must_reject, RegistryLoadOptions.MaxPhrases); split the registry or raise the limit.");
        return false;
    }

    private List<string> ReadWordList(RegistryMapping map, string key, string owner)
    {
        var words = new List<string>();
        var list = ReadOptionalList(map, key, owner, "list one word per '- ' line");
        if (list is null) return words;
        foreach (var item in list.Items)
        {
            string? word = ReadItemText(item, key, owner, RegistryDiagnosticCodes.EmptyWord);
            if (word is not null) words.Add(word);
        }
        return words;
    }

    private RegistrySequence? ReadOptionalList(RegistryMapping map, string key, string owner, string hint)
    {
        if (!map.TryGet(key, out _, out var value) || value is RegistryScalar { IsNull: true }) return null;
        if (value is RegistrySequence list) return list;
        _bag.Error(RegistryDiagnosticCodes.WrongType, value.Position, $"'{key}' of {owner} must be a list, but is {value.Describe()}; {hint}.");
        return null;
    }

    /// <summary>One text item of a list, normalised; null (after recording an error) when it is not usable text.</summary>
    private string? ReadItemText(RegistryNode item, string key, string owner, string emptyCode)
    {
        if (item is not RegistryScalar s)
        {
            _bag.Error(RegistryDiagnosticCodes.WrongType, item.Position,
                $"each entry of '{key}' of {owner} must be text, but this one is {item.Describe()}; write one entry per '- ' line.");
            return null;
        }
        string text = s.IsNull ? "" : TextNormalizer.Normalize(s.Value);
        if (text.Length == 0)
        {
            _bag.Error(emptyCode, s.Position, $"an entry of '{key}' of {owner} is empty; write the text or remove the line.");
            return null;
        }
        return text;
    }

    private string? ReadRequiredText(RegistryMapping map, string key, string owner, string missingCode, string hint)
    {
        if (!map.TryGet(key, out var keyNode, out var value))
        {
            _bag.Error(missingCode, map.Position, $"{owner} has no '{key}'; {hint}.");
            return null;
        }
        if (value is not RegistryScalar s)
        {
            _bag.Error(RegistryDiagnosticCodes.WrongType, value.Position, $"'{key}' of {owner} must be text, but is {value.Describe()}; {hint}.");
            return null;
        }
        string text = s.IsNull ? "" : TextNormalizer.Normalize(s.Value);
        if (text.Length == 0)
        {
            _bag.Error(missingCode, s.IsNull ? keyNode.Position : s.Position, $"'{key}' of {owner} is empty; {hint}.");
            return null;
        }
        return text;
    }

    /// <summary>
    /// An optional text value: absent or null gives null. Normalised when asked; otherwise (paths, names) kept as
    /// written but refused when it holds control characters or broken surrogates.
    /// </summary>
    private string? ReadOptionalText(RegistryMapping map, string key, string owner, string hint, bool normalize)
    {
        if (!map.TryGet(key, out _, out var value) || value is RegistryScalar { IsNull: true }) return null;
        if (value is not RegistryScalar s)
        {
            _bag.Error(RegistryDiagnosticCodes.WrongType, value.Position, $"'{key}' of {owner} must be text, but is {value.Describe()}; {hint}.");
            return null;
        }
        string text = normalize ? TextNormalizer.Normalize(s.Value) : s.Value;
        if (text.Trim().Length == 0)
        {
            _bag.Error(RegistryDiagnosticCodes.WrongType, s.Position, $"'{key}' of {owner} is empty text; {hint}, or remove the key.");
            return null;
        }
        if (!normalize && !IsCleanText(text))
        {
            _bag.Error(RegistryDiagnosticCodes.WrongType, s.Position, $"'{key}' of {owner} holds control characters; {hint}.");
            return null;
        }
        return text;
    }

    private bool? ReadOptionalBool(RegistryMapping map, string key, string owner)
    {
        if (!map.TryGet(key, out _, out var value) || value is RegistryScalar { IsNull: true }) return null;
        if (value is RegistryScalar { IsPlain: true } s)
        {
            if (s.Value is "true" or "True" or "TRUE") return true;
            if (s.Value is "false" or "False" or "FALSE") return false;
        }
        _bag.Error(RegistryDiagnosticCodes.WrongType, value.Position, $"'{key}' of {owner} must be true or false, but is {value.Describe()}.");
        return null;
    }

    private float? ReadThreshold(RegistryMapping map, string key, string owner)
    {
        if (!map.TryGet(key, out _, out var value) || value is RegistryScalar { IsNull: true }) return null;
        if (value is not RegistryScalar { IsPlain: true } s || !TryParseFloat(s.Value, out double wide, out float number))
        {
            _bag.Error(RegistryDiagnosticCodes.WrongType, value.Position,
                $"'{key}' of {owner} must be a number between -1 and 1 (a cosine similarity such as 0.65), but is {value.Describe()}.");
            return null;
        }
        if (!double.IsFinite(wide) || wide < -1 || wide > 1)
        {
            _bag.Error(RegistryDiagnosticCodes.OutOfRange, s.Position,
                $"'{key}' of {owner} is {s.Value}, outside [-1, 1]; a cosine-similarity threshold lies between -1 and 1 (0.5 to 0.8 is usual).");
            return null;
        }
        return number == 0 ? 0f : number; // -0 and 0 are the same threshold
    }

    private void CheckKeys(RegistryMapping map, string[] allowed, string owner)
    {
        foreach (var (key, _) in map.Entries)
        {
            if (allowed.Contains(key.Value, StringComparer.Ordinal)) continue;
            string? suggestion = EditDistance.Suggest(key.Value, allowed);
            string hint = suggestion is null ? "" : $"; did you mean '{suggestion}'?";
            _bag.Error(RegistryDiagnosticCodes.UnknownKey, key.Position,
                $"unknown key '{Shorten(key.Value)}' in {owner}{hint} The keys allowed here are: {string.Join(", ", allowed)}.");
        }
    }

    internal static bool TryParseInt(string text, out int value)
    {
        value = 0;
        return IntLiteral().IsMatch(text) && int.TryParse(text, NumberStyles.AllowLeadingSign, CultureInfo.InvariantCulture, out value);
    }

    /// <summary>YAML 1.2 core-schema floats (and integers), including <c>.inf</c> and <c>.nan</c>.</summary>
    internal static bool TryParseFloat(string text, out double wide, out float value)
    {
        wide = double.NaN;
        value = float.NaN;
        if (FloatLiteral().IsMatch(text))
        {
            wide = double.Parse(text, NumberStyles.Float, CultureInfo.InvariantCulture);
            value = float.Parse(text, NumberStyles.Float, CultureInfo.InvariantCulture);
            return true;
        }
        if (InfLiteral().IsMatch(text))
        {
            wide = text.StartsWith('-') ? double.NegativeInfinity : double.PositiveInfinity;
            value = (float)wide;
            return true;
        }
        return text is ".nan" or ".NaN" or ".NAN";
    }

    private static bool IsCleanText(string text)
    {
        for (int i = 0; i < text.Length; i++)
        {
            char c = text[i];
            if (char.IsControl(c)) return false;
            if (char.IsHighSurrogate(c) && i + 1 < text.Length && char.IsLowSurrogate(text[i + 1])) { i++; continue; }
            if (char.IsSurrogate(c)) return false;
        }
        return true;
    }

    private static string Shorten(string text) => text.Length > 60 ? text[..60] + "…" : text;

    [GeneratedRegex("^[a-z0-9]+(-[a-z0-9]+)*$")]
    internal static partial Regex KebabCase();

    [GeneratedRegex("^[-+]?[0-9]+$")]
    private static partial Regex IntLiteral();

    [GeneratedRegex(@"^[-+]?(\.[0-9]+|[0-9]+(\.[0-9]*)?)([eE][-+]?[0-9]+)?$")]
    private static partial Regex FloatLiteral();

    [GeneratedRegex(@"^[-+]?\.(inf|Inf|INF)$")]
    private static partial Regex InfLiteral();
}
