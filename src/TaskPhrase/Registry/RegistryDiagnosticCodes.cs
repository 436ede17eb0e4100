namespace TaskPhrase.Registry;

/// <summary>The codes a <see cref="RegistryDiagnostic"/> can carry. They are stable: tools may match on them.</summary>
public static class RegistryDiagnosticCodes
{
    /// <summary>The file does not exist.</summary>
    public const string FileNotFound = "file-not-found";
    /// <summary>The file exists but cannot be read (permissions, a directory, I/O error).</summary>
    public const string FileUnreadable = "file-unreadable";
    /// <summary>The file or text is larger than <see cref="RegistryLoadOptions.MaxFileBytes"/>.</summary>
    public const string FileTooLarge = "file-too-large";
    /// <summary>The bytes are not valid UTF-8 (or the file is UTF-16).</summary>
    public const string NotUtf8 = "not-utf8";
    /// <summary>The text holds NUL or other control characters: binary data, not a registry.</summary>
    public const string BinaryContent = "binary-content";
    /// <summary>The YAML itself is malformed.</summary>
    public const string YamlSyntax = "yaml-syntax";
    /// <summary>The canonical JSON form (as stored in an index) is malformed.</summary>
    public const string JsonSyntax = "json-syntax";
    /// <summary>A YAML anchor (<c>&amp;name</c>) or alias (<c>*name</c>); registries may not use them.</summary>
    public const string AliasNotAllowed = "alias-not-allowed";
    /// <summary>An explicit YAML tag (<c>!!str</c>, <c>!thing</c>); registries may not use them.</summary>
    public const string TagNotAllowed = "tag-not-allowed";
    /// <summary>Collections nested deeper than <see cref="RegistryLoadOptions.MaxDepth"/>.</summary>
    public const string TooDeep = "too-deep";
    /// <summary>More YAML nodes than <see cref="RegistryLoadOptions.MaxNodes"/>.</summary>
    public const string TooManyNodes = "too-many-nodes";
    /// <summary>More tasks than <see cref="RegistryLoadOptions.MaxTasks"/>.</summary>
    public const string TooManyTasks = "too-many-tasks";
    /// <summary>More phrases (approved and must_reject) than <see cref="RegistryLoadOptions.MaxPhrases"/>.</summary>
    public const string TooManyPhrases = "too-many-phrases";
    /// <summary>The same key twice in one mapping.</summary>
    public const string DuplicateKey = "duplicate-key";
    /// <summary>More than one YAML document (<c>---</c>) in the file.</summary>
    public const string MultipleDocuments = "multiple-documents";
    /// <summary>The file holds no registry at all (empty, or only comments).</summary>
    public const string EmptyRegistry = "empty-registry";
    /// <summary>A value of the wrong kind: a mapping where a list is expected, text where a number is expected, etc.</summary>
    public const string WrongType = "wrong-type";
    /// <summary>A key that the format does not know (the message suggests the closest known key).</summary>
    public const string UnknownKey = "unknown-key";
    /// <summary>The top-level <c>version</c> key is missing.</summary>
    public const string MissingVersion = "missing-version";
    /// <summary>The <c>version</c> is not one this library reads (only 1).</summary>
    public const string UnknownVersion = "unknown-version";
    /// <summary>The top-level <c>tasks</c> key is missing.</summary>
    public const string MissingTasks = "missing-tasks";
    /// <summary>The <c>tasks</c> list is empty.</summary>
    public const string NoTasks = "no-tasks";
    /// <summary>A task has no <c>id</c>.</summary>
    public const string MissingId = "missing-id";
    /// <summary>A task id is not kebab-case.</summary>
    public const string BadId = "bad-id";
    /// <summary>Two tasks have the same id.</summary>
    public const string DuplicateId = "duplicate-id";
    /// <summary>A task has no <c>title</c>.</summary>
    public const string MissingTitle = "missing-title";
    /// <summary>A task has no <c>phrases</c> key.</summary>
    public const string MissingPhrases = "missing-phrases";
    /// <summary>A task's <c>phrases</c> list is empty.</summary>
    public const string EmptyPhrases = "empty-phrases";
    /// <summary>A phrase (approved or must_reject) is empty after normalisation.</summary>
    public const string EmptyPhrase = "empty-phrase";
    /// <summary>A word in <c>also_words</c>, <c>hazard_words</c> or <c>allow_words</c> is empty.</summary>
    public const string EmptyWord = "empty-word";
    /// <summary>The same normalised phrase twice, within one task or across tasks.</summary>
    public const string DuplicatePhrase = "duplicate-phrase";
    /// <summary>The same normalised must_reject phrase twice in one task (warning).</summary>
    public const string DuplicateMustReject = "duplicate-must-reject";
    /// <summary>A must_reject phrase is the same (normalised) as an approved phrase of some task.</summary>
    public const string MustRejectEqualsPhrase = "must-reject-equals-phrase";
    /// <summary>A number outside its allowed range (<c>accept</c> and <c>margin</c>: [-1, 1], finite).</summary>
    public const string OutOfRange = "out-of-range";
    /// <summary>A task has no <c>controller</c>.</summary>
    public const string MissingController = "missing-controller";
    /// <summary>A controller has no <c>manifold</c>.</summary>
    public const string MissingManifold = "missing-manifold";
    /// <summary>A controller has no <c>latent_dims</c>.</summary>
    public const string MissingLatentDims = "missing-latent-dims";
    /// <summary>A controller's <c>latent_dims</c> is below 1.</summary>
    public const string BadLatentDims = "bad-latent-dims";
    /// <summary>The <c>scoring</c> value is not a known strategy.</summary>
    public const string UnknownScoring = "unknown-scoring";
}
