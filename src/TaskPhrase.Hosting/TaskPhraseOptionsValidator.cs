using Microsoft.Extensions.Options;
using TaskPhrase.Onnx;

namespace TaskPhrase.Hosting;

/// <summary>Validates <see cref="TaskPhraseOptions"/> at start-up; every message names the setting and says what to do.</summary>
internal sealed class TaskPhraseOptionsValidator(RegistrySources sources) : IValidateOptions<TaskPhraseOptions>
{
    private const string Prefix = TaskPhraseOptions.SectionName + ":";

    public ValidateOptionsResult Validate(string? name, TaskPhraseOptions options)
    {
        var failures = new List<string>();
        bool hasRegistry = !string.IsNullOrWhiteSpace(options.RegistryPath);
        bool hasIndex = !string.IsNullOrWhiteSpace(options.IndexPath);
        if (sources.Registry is not null)
        {
            if (hasRegistry || hasIndex)
                failures.Add($"{Prefix}RegistryPath / {Prefix}IndexPath is set, but a registry was also supplied in code (UseRegistry). Use one or the other.");
        }
        else if (hasRegistry && hasIndex)
            failures.Add($"{Prefix}RegistryPath and {Prefix}IndexPath are both set ('{options.RegistryPath}', '{options.IndexPath}'). Set only one: the registry YAML file or its compiled index.");
        else if (!hasRegistry && !hasIndex)
            failures.Add($"No registry to serve: set {Prefix}RegistryPath to a registry YAML file or {Prefix}IndexPath to a compiled index (or call UseRegistry in code).");
        else if (hasRegistry && !File.Exists(options.RegistryPath))
            failures.Add($"{Prefix}RegistryPath: file '{Path.GetFullPath(options.RegistryPath!)}' does not exist. Point it at a registry YAML file.");
        else if (hasIndex && !File.Exists(options.IndexPath))
            failures.Add($"{Prefix}IndexPath: file '{Path.GetFullPath(options.IndexPath!)}' does not exist. Build one with 'taskphrase build', or serve the registry file with {Prefix}RegistryPath.");

        if (options.ModelDirectory is { } model && !Directory.Exists(model) && !BuiltInModels.Ids.Contains(model))
            failures.Add($"{Prefix}ModelDirectory: '{Path.GetFullPath(model)}' is neither a directory nor a built-in model id ({string.Join(", ", BuiltInModels.Ids)}). Point it at a folder with model.onnx, vocab.txt and model.json, or leave it unset for the bundled model.");
        if (options.Accept is { } accept && !(accept is >= 0f and <= 1f))
            failures.Add($"{Prefix}Accept is {accept}; it must be between 0 and 1 (a cosine similarity), or unset to keep the registry's thresholds.");
        if (options.Margin is { } margin && !(margin is >= 0f and <= 1f))
            failures.Add($"{Prefix}Margin is {margin}; it must be between 0 and 1, or unset to keep the registry's margins.");
        if (options.Threads is < 0 or > 256)
            failures.Add($"{Prefix}Threads is {options.Threads}; it must be between 0 (ONNX Runtime chooses) and 256.");
        if (options.ReloadDebounce < TimeSpan.Zero || options.ReloadDebounce > TimeSpan.FromSeconds(60))
            failures.Add($"{Prefix}ReloadDebounce is {options.ReloadDebounce}; it must be between 00:00:00 and 00:01:00.");
        return failures.Count == 0 ? ValidateOptionsResult.Success : ValidateOptionsResult.Fail(failures);
    }
}
