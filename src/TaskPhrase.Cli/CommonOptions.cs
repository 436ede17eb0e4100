using System.CommandLine;

namespace TaskPhrase.Cli;

/// <summary>Options shared by several verbs, built fresh for each command.</summary>
internal static class CommonOptions
{
    public static Option<bool> Json() => new("--json") { Description = "Machine-readable JSON output (snake_case keys)." };

    public static Option<string?> Model() => new("--model")
    {
        Description = "Model directory (model.onnx, vocab.txt, model.json) or built-in id; default: the bundled all-MiniLM-L6-v2.",
    };

    public static Option<string?> Input() => new("--input")
    {
        Description = "Read texts one per line from FILE (- for standard input).",
    };

    public static Option<string?> Registry() => new("--registry") { Description = "Registry YAML file." };

    public static Option<string?> Index() => new("--index") { Description = "Compiled index file (from 'taskphrase build')." };

    public static Option<string?> Film() => new("--film") { Description = "FiLM generator weights (safetensors) for conditioning vectors." };

    public static Option<bool> Verbose() => new("--verbose") { Description = "Show stack traces of failures.", Recursive = true };
}
