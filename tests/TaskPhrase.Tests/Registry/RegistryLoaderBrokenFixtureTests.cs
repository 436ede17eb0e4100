using TaskPhrase.Registry;

namespace TaskPhrase.Tests.Registry;

/// <summary>
/// One broken file per defect (tests/data/registries/broken), each named for its defect. Every row asserts the
/// exact code and place of the single error the file must produce. Lines and columns were counted by hand in the
/// fixture (line 1 is the "# Defect:" comment; columns are 1-based).
/// </summary>
public class RegistryLoaderBrokenFixtureTests
{
    [Theory]
    [InlineData("unknown-key.yaml", RegistryDiagnosticCodes.UnknownKey, 6, 5, "did you mean 'confirm'?")]
    [InlineData("no-version.yaml", RegistryDiagnosticCodes.MissingVersion, 2, 1, "add 'version: 1'")]
    [InlineData("unknown-version.yaml", RegistryDiagnosticCodes.UnknownVersion, 2, 10, "reads version 1 only")]
    [InlineData("duplicate-id.yaml", RegistryDiagnosticCodes.DuplicateId, 12, 9, "'hall-light' is already used by the task at line 4, column 9")]
    [InlineData("bad-id.yaml", RegistryDiagnosticCodes.BadId, 12, 9, "'Water_Basil' is not a kebab-case id")]
    [InlineData("missing-id.yaml", RegistryDiagnosticCodes.MissingId, 12, 5, "task 2 has no 'id'")]
    [InlineData("missing-title.yaml", RegistryDiagnosticCodes.MissingTitle, 12, 5, "task water-basil has no 'title'")]
    [InlineData("empty-phrases.yaml", RegistryDiagnosticCodes.EmptyPhrases, 17, 14, "'phrases' of task water-basil is empty")]
    [InlineData("missing-phrases.yaml", RegistryDiagnosticCodes.MissingPhrases, 12, 5, "task water-basil has no 'phrases'")]
    [InlineData("empty-phrase.yaml", RegistryDiagnosticCodes.EmptyPhrase, 19, 9, "is empty")]
    [InlineData("duplicate-phrase-within-task.yaml", RegistryDiagnosticCodes.DuplicatePhrase, 19, 9, "appears twice in task water-basil (first at line 18, column 9")]
    [InlineData("duplicate-phrase-across-tasks.yaml", RegistryDiagnosticCodes.DuplicatePhrase, 19, 9,
        "of task water-basil (at line 19, column 9) is the same after normalisation as 'turn on the hall light' of task hall-light (at line 10, column 9)")]
    [InlineData("accept-out-of-range.yaml", RegistryDiagnosticCodes.OutOfRange, 14, 13, "is 1.5, outside [-1, 1]")]
    [InlineData("margin-not-a-number.yaml", RegistryDiagnosticCodes.WrongType, 5, 11, "'margin' of 'defaults' must be a number")]
    [InlineData("confirm-not-bool.yaml", RegistryDiagnosticCodes.WrongType, 14, 14, "must be true or false")]
    [InlineData("must-reject-equals-phrase.yaml", RegistryDiagnosticCodes.MustRejectEqualsPhrase, 21, 9,
        "approved phrase 'turn on the hall light' of task hall-light (at line 10, column 9)")]
    [InlineData("alias.yaml", RegistryDiagnosticCodes.AliasNotAllowed, 6, 17, "anchor '&reach'")]
    [InlineData("duplicate-key.yaml", RegistryDiagnosticCodes.DuplicateKey, 6, 5, "'title' appears twice in the same mapping (first at line 5, column 5)")]
    [InlineData("deep-nesting.yaml", RegistryDiagnosticCodes.TooDeep, 17, 19, "nested more than 8 deep")]
    [InlineData("missing-controller.yaml", RegistryDiagnosticCodes.MissingController, 12, 5, "task water-basil has no 'controller'")]
    [InlineData("missing-manifold.yaml", RegistryDiagnosticCodes.MissingManifold, 15, 7, "has no 'manifold'")]
    [InlineData("latent-dims-zero.yaml", RegistryDiagnosticCodes.BadLatentDims, 16, 20, "is 0")]
    [InlineData("wrong-type.yaml", RegistryDiagnosticCodes.WrongType, 18, 7, "must be a list, but is a mapping")]
    [InlineData("multiple-documents.yaml", RegistryDiagnosticCodes.MultipleDocuments, 20, 1, "second YAML document")]
    [InlineData("tag.yaml", RegistryDiagnosticCodes.TagNotAllowed, 16, 20, "tag '!!int'")]
    [InlineData("yaml-syntax.yaml", RegistryDiagnosticCodes.YamlSyntax, 13, 27, "malformed")]
    [InlineData("unknown-scoring.yaml", RegistryDiagnosticCodes.UnknownScoring, 3, 10, "did you mean 'centroid'?")]
    [InlineData("no-tasks.yaml", RegistryDiagnosticCodes.NoTasks, 3, 8, "'tasks' list is empty")]
    [InlineData("empty-file.yaml", RegistryDiagnosticCodes.EmptyRegistry, 1, 1, "holds no registry")]
    [InlineData("binary-junk.yaml", RegistryDiagnosticCodes.BinaryContent, 2, 1, "NUL byte")]
    [InlineData("not-utf8.yaml", RegistryDiagnosticCodes.NotUtf8, 19, 32, "0xE9")]
    [InlineData("utf16.yaml", RegistryDiagnosticCodes.NotUtf8, 1, 1, "UTF-16")]
    [InlineData("noncharacter-in-phrase.yaml", RegistryDiagnosticCodes.DuplicatePhrase, 11, 9, "appears twice in task water-basil (first at line 10, column 9")]
    public void TryLoad_BrokenFixture_ReportsItsOneErrorWithPlace(string file, string code, int line, int column, string messagePart)
    {
        string path = RegistryFixtures.Broken(file);
        Assert.True(File.Exists(path), $"fixture {path} is missing");

        var result = RegistryLoader.TryLoad(path);

        Assert.False(result.Succeeded);
        Assert.Null(result.Registry);
        var error = Assert.Single(result.Errors);
        Assert.Equal((code, line, column), (error.Code, error.Line, error.Column));
        Assert.Contains(messagePart, error.Message, StringComparison.Ordinal);
        Assert.Equal(path, error.Source);
        Assert.StartsWith($"{path}:{line}:{column}: error {code}: ", error.ToString(), StringComparison.Ordinal);
    }

    [Fact]
    public void BrokenFolder_EveryFixture_HasATestRow()
    {
        // Keeps the folder and the table above in step: a new fixture without a row fails here.
        var rows = typeof(RegistryLoaderBrokenFixtureTests)
            .GetMethod(nameof(TryLoad_BrokenFixture_ReportsItsOneErrorWithPlace))!
            .GetCustomAttributes(typeof(InlineDataAttribute), false)
            .Cast<InlineDataAttribute>()
            .Select(a => (string)a.GetData(null!).First()[0])
            .ToHashSet(StringComparer.Ordinal);
        var files = Directory.GetFiles(Path.Combine(RegistryFixtures.Root, "broken")).Select(Path.GetFileName).ToList();
        Assert.NotEmpty(files);
        Assert.All(files, f => Assert.Contains(f!, rows));
    }

    [Fact]
    public void Load_BrokenFixture_ThrowsRegistryExceptionCarryingTheDiagnostic()
    {
        string path = RegistryFixtures.Broken("duplicate-id.yaml");

        var ex = Assert.Throws<RegistryException>(() => RegistryLoader.Load(path));

        var error = Assert.Single(ex.Errors);
        Assert.Equal(RegistryDiagnosticCodes.DuplicateId, error.Code);
        Assert.Contains($"{path}:12:9: error duplicate-id:", ex.Message, StringComparison.Ordinal);
    }
}
