using System.Diagnostics;
using System.Text;
using TaskPhrase.Registry;

namespace TaskPhrase.Tests.Registry;

public class RegistryLoaderTests
{
    [Fact]
    public void Load_SmallFixture_ReadsEveryValueAsWritten()
    {
        // Expected values are those written in tests/data/registries/valid/small.yaml.
        string path = RegistryFixtures.Valid("small.yaml");

        var registry = RegistryLoader.Load(path);

        Assert.Equal(["hall-light", "water-basil", "kettle-pour"], registry.Tasks.Select(t => t.Id));
        Assert.Equal("all-minilm-l6-v2", registry.ModelId);
        Assert.Equal(path, registry.SourcePath);
        Assert.Equal(new RegistryDefaults(0.60f, 0.04f), registry.Defaults);
        Assert.Equal(["scald"], registry.Settings.HazardWords);
        Assert.Null(registry.Settings.Scoring);

        var light = registry.Find("hall-light")!;
        Assert.Equal("Press the hall light switch", light.Title);
        Assert.False(light.Confirm);
        Assert.Null(light.Accept);
        Assert.Equal(new ControllerBinding("reach-press.v1", 1), light.Controller);
        Assert.Equal(6, light.Phrases.Count);
        Assert.Equal("press the hall light switch", light.Phrases[0]);
        Assert.Equal(["lamp", "hallway"], light.AlsoWords);

        var basil = registry.Find("water-basil")!;
        Assert.Equal(0.65f, basil.Accept);
        Assert.Equal(0.65f, registry.AcceptFor(basil));
        Assert.Equal(0.04f, registry.MarginFor(basil));
        Assert.Equal(new ControllerBinding("pour-arc.v2", 2, "decoders/pour-arc.v2.onnx"), basil.Controller);
        Assert.Equal(["throw the basil away", "pour water on the floor"], basil.MustReject);

        var kettle = registry.Find("kettle-pour")!;
        Assert.True(kettle.Confirm);
        Assert.Equal(0.70f, kettle.Accept);
        Assert.Equal(0.06f, kettle.Margin);
        Assert.Matches("^[0-9a-f]{64}$", registry.ContentHash);
    }

    [Fact]
    public void Parse_Phrases_AreStoredNormalisedWithCaseKept()
    {
        string yaml = RegistryFixtures.TwoTasks.Replace("- water the basil", "- \"  Water\\u00A0the \\t basil \"");

        var registry = RegistryLoader.Parse(yaml, "inline.yaml");

        Assert.Equal("Water the basil", registry.Find("water-basil")!.Phrases[0]);
    }

    [Fact]
    public void TryParse_SeveralDefects_ReportsEveryErrorInFileOrder()
    {
        const string yaml = """
            version: 1
            tasks:
              - id: Hall_Light
                title: Press the hall light switch
                controller: {manifold: reach-press.v1, latent_dims: 1}
                phrases: [turn on the hall light]
              - id: water-basil
                titel: Water the basil
                accept: 2
                controller: {manifold: pour-arc.v2, latent_dims: 2}
                phrases: [water the basil, Turn on the hall light.]
            """;

        var result = RegistryLoader.TryParse(yaml, "many.yaml");

        Assert.False(result.Succeeded);
        Assert.Equal(
            [
                ("bad-id", 3, 9),
                ("missing-title", 7, 5),
                ("unknown-key", 8, 5),
                ("out-of-range", 9, 13),
                ("duplicate-phrase", 11, 32),
            ],
            result.Errors.Select(e => (e.Code, e.Line, e.Column)));
        Assert.Contains("did you mean 'title'?", result.Errors.Single(e => e.Code == "unknown-key").Message, StringComparison.Ordinal);
        // The duplicate names the other task by its position, as its id was refused.
        Assert.Contains("of task 1 (at line 6, column 15)", result.Errors.Single(e => e.Code == "duplicate-phrase").Message, StringComparison.Ordinal);
    }

    [Fact]
    public void TryParse_UnknownKeyFarFromEveryKnownKey_GivesNoSuggestion()
    {
        string yaml = RegistryFixtures.TwoTasks.Replace("version: 1", "version: 1\ncolour: red");

        var error = Assert.Single(RegistryLoader.TryParse(yaml, "r.yaml").Errors);

        Assert.Equal(("unknown-key", 2, 1), (error.Code, error.Line, error.Column));
        Assert.DoesNotContain("did you mean", error.Message, StringComparison.Ordinal);
    }

    [Theory]
    [InlineData("hazard_word: [scald]", "hazard_words")]
    [InlineData("Model: all-minilm-l6-v2", "model")]
    [InlineData("defualts: {accept: 0.6}", "defaults")]
    public void TryParse_MisspeltRootKey_SuggestsTheNearestKey(string line, string suggestion)
    {
        string yaml = RegistryFixtures.TwoTasks.Replace("version: 1", "version: 1\n" + line);

        var error = Assert.Single(RegistryLoader.TryParse(yaml, "r.yaml").Errors);

        Assert.Equal(RegistryDiagnosticCodes.UnknownKey, error.Code);
        Assert.Contains($"did you mean '{suggestion}'?", error.Message, StringComparison.Ordinal);
    }

    [Fact]
    public void TryParse_UnknownVersion_ReportsNothingElse()
    {
        // Another version may define other keys; reporting them as unknown would only be noise.
        var error = Assert.Single(RegistryLoader.TryParse("version: 3\nintents: []\n", "v3.yaml").Diagnostics);

        Assert.Equal((RegistryDiagnosticCodes.UnknownVersion, 1, 10), (error.Code, error.Line, error.Column));
    }

    [Fact]
    public void TryParse_OptionalKeysGivenAsNull_CountAsAbsent()
    {
        string yaml = RegistryFixtures.TwoTasks
            .Replace("version: 1", "version: 1\nmodel: ~\ndefaults:\nscoring: null")
            .Replace("    title: Press the hall light switch", "    title: Press the hall light switch\n    accept: ~\n    confirm:\n    must_reject:\n    also_words: null");

        var registry = RegistryLoader.Parse(yaml, "nulls.yaml");
        var light = registry.Find("hall-light")!;

        Assert.Null(registry.ModelId);
        Assert.Equal(RegistryDefaults.Standard, registry.Defaults);
        Assert.Null(light.Accept);
        Assert.False(light.Confirm);
        Assert.Empty(light.MustReject);
        Assert.Equal(RegistryLoader.Parse(RegistryFixtures.TwoTasks, "plain.yaml").ContentHash, registry.ContentHash);
    }

    [Fact]
    public void TryParse_EmptyTitleValue_PointsAtTheKey()
    {
        string yaml = RegistryFixtures.TwoTasks.Replace("    title: Press the hall light switch", "    title:");

        var error = Assert.Single(RegistryLoader.TryParse(yaml, "r.yaml").Errors);

        Assert.Equal((RegistryDiagnosticCodes.MissingTitle, 4, 5), (error.Code, error.Line, error.Column));
    }

    [Fact]
    public void TryParse_MustRejectTwiceInOneTask_WarnsAndLoads()
    {
        string yaml = RegistryFixtures.TwoTasks + "\n    must_reject: [throw the basil away, Throw the basil away!]";

        var result = RegistryLoader.TryParse(yaml, "r.yaml");

        Assert.True(result.Succeeded);
        var warning = Assert.Single(result.Warnings);
        Assert.Equal((RegistryDiagnosticCodes.DuplicateMustReject, DiagnosticSeverity.Warning, 19, 41),
            (warning.Code, warning.Severity, warning.Line, warning.Column));
        Assert.StartsWith("r.yaml:19:41: warning duplicate-must-reject: ", warning.ToString(), StringComparison.Ordinal);
        Assert.Equal(["throw the basil away"], result.Registry!.Find("water-basil")!.MustReject);
    }

    [Fact]
    public void TryParse_MoreTasksThanTheLimit_RefusesAtTheFirstTaskOver()
    {
        var result = RegistryLoader.TryParse(RegistryFixtures.TwoTasks, "r.yaml", new RegistryLoadOptions { MaxTasks = 1 });

        var error = Assert.Single(result.Errors);
        Assert.Equal((RegistryDiagnosticCodes.TooManyTasks, 11, 5), (error.Code, error.Line, error.Column));
    }

    [Fact]
    public void TryParse_MorePhrasesThanTheLimit_RefusesAtTheFirstPhraseOver()
    {
        var result = RegistryLoader.TryParse(RegistryFixtures.TwoTasks, "r.yaml", new RegistryLoadOptions { MaxPhrases = 3 });

        var error = Assert.Single(result.Errors);
        Assert.Equal((RegistryDiagnosticCodes.TooManyPhrases, 18, 9), (error.Code, error.Line, error.Column));
    }

    [Fact]
    public void TryParse_MoreNodesThanTheLimit_Refused()
    {
        var result = RegistryLoader.TryParse(RegistryFixtures.TwoTasks, "r.yaml", new RegistryLoadOptions { MaxNodes = 16 });

        Assert.Equal(RegistryDiagnosticCodes.TooManyNodes, Assert.Single(result.Errors).Code);
    }

    [Fact]
    public void TryParse_MegabyteOfOpenBrackets_RefusedQuicklyAtTheFirstLevelTooDeep()
    {
        // YamlDotNet slows down sharply on very deep flow nesting; reading must stop at the depth limit.
        string yaml = "version: 1\ntasks: " + new string('[', 1_000_000);
        var watch = Stopwatch.StartNew();

        var result = RegistryLoader.TryParse(yaml, "deep.yaml");

        watch.Stop();
        var error = Assert.Single(result.Errors);
        // Root mapping is level 1, so the 8th '[' (column 8 + 7) opens level 9.
        Assert.Equal((RegistryDiagnosticCodes.TooDeep, 2, 15), (error.Code, error.Line, error.Column));
        Assert.True(watch.Elapsed < TimeSpan.FromSeconds(5), $"took {watch.Elapsed}");
    }

    [Fact]
    public void TryLoad_MultiMegabyteFileOverTheLimit_RefusedBeforeItIsOpened()
    {
        string path = Path.Combine(Path.GetTempPath(), $"taskphrase-huge-{Guid.NewGuid():N}.yaml");
        try
        {
            using (var create = new FileStream(path, FileMode.CreateNew))
                create.SetLength(64L * 1024 * 1024); // 64 MiB, sparse where the file system allows
            // Hold the file locked: if the loader tried to open or read it, it would fail with file-unreadable.
            using var locked = new FileStream(path, FileMode.Open, FileAccess.ReadWrite, FileShare.None);
            Assert.Throws<IOException>(() => new FileStream(path, FileMode.Open, FileAccess.Read, FileShare.ReadWrite).Dispose());
            var watch = Stopwatch.StartNew();

            var result = RegistryLoader.TryLoad(path);

            watch.Stop();
            var error = Assert.Single(result.Errors);
            Assert.Equal(RegistryDiagnosticCodes.FileTooLarge, error.Code);
            Assert.False(error.HasLocation);
            Assert.Contains("67,108,864 bytes", error.Message, StringComparison.Ordinal);
            Assert.Contains("4,194,304", error.Message, StringComparison.Ordinal);
            Assert.Equal($"{path}: error file-too-large: {error.Message}", error.ToString());
            Assert.True(watch.Elapsed < TimeSpan.FromSeconds(2), $"took {watch.Elapsed}");
        }
        finally
        {
            File.Delete(path);
        }
    }

    [Fact]
    public void TryLoad_FileOverACustomLimit_Refused()
    {
        var result = RegistryLoader.TryLoad(RegistryFixtures.Valid("small.yaml"), new RegistryLoadOptions { MaxFileBytes = 100 });

        Assert.Equal(RegistryDiagnosticCodes.FileTooLarge, Assert.Single(result.Errors).Code);
    }

    [Fact]
    public void TryParse_TextOverTheLimit_RefusedWithoutParsing()
    {
        string yaml = "version: 1\n#" + new string('x', 5 * 1024 * 1024);

        var error = Assert.Single(RegistryLoader.TryParse(yaml, "big.yaml").Errors);

        Assert.Equal(RegistryDiagnosticCodes.FileTooLarge, error.Code);
    }

    [Fact]
    public void TryLoad_MissingFile_ReportsFileNotFound()
    {
        string path = Path.Combine(Path.GetTempPath(), $"taskphrase-none-{Guid.NewGuid():N}.yaml");

        var error = Assert.Single(RegistryLoader.TryLoad(path).Errors);

        Assert.Equal(RegistryDiagnosticCodes.FileNotFound, error.Code);
        Assert.Equal(path, error.Source);
    }

    [Fact]
    public void TryLoad_Directory_ReportsFileUnreadable()
    {
        var error = Assert.Single(RegistryLoader.TryLoad(RegistryFixtures.Root).Errors);

        Assert.Equal(RegistryDiagnosticCodes.FileUnreadable, error.Code);
    }

    [Fact]
    public void TryParse_ControlCharacter_RefusedWithPlace()
    {
        var error = Assert.Single(RegistryLoader.TryParse("version: 1\r\ntasks: \u0007\n", "bell.yaml").Errors);

        Assert.Equal((RegistryDiagnosticCodes.BinaryContent, 2, 8), (error.Code, error.Line, error.Column));
        Assert.Contains("U+0007", error.Message, StringComparison.Ordinal);
    }

    [Fact]
    public void TryParse_LoneSurrogate_Refused()
    {
        var error = Assert.Single(RegistryLoader.TryParse("version: 1\ntasks: \uD800\n", "s.yaml").Errors);

        Assert.Equal((RegistryDiagnosticCodes.NotUtf8, 2, 8), (error.Code, error.Line, error.Column));
    }

    [Fact]
    public void TryLoad_Utf8ByteOrderMark_IsAccepted()
    {
        string path = Path.Combine(Path.GetTempPath(), $"taskphrase-bom-{Guid.NewGuid():N}.yaml");
        try
        {
            File.WriteAllText(path, RegistryFixtures.TwoTasks, new UTF8Encoding(encoderShouldEmitUTF8Identifier: true));

            var registry = RegistryLoader.Load(path);

            Assert.Equal(RegistryLoader.Parse(RegistryFixtures.TwoTasks, "x").ContentHash, registry.ContentHash);
        }
        finally
        {
            File.Delete(path);
        }
    }

    [Fact]
    public void TryParse_UnclosedFlowList_ReportsYamlSyntax()
    {
        string yaml = RegistryFixtures.TwoTasks.Replace("      - give the basil a drink", "").Replace("    phrases:\n      - water the basil", "    phrases: [water the basil");

        var error = Assert.Single(RegistryLoader.TryParse(yaml, "r.yaml").Errors);

        Assert.Equal(RegistryDiagnosticCodes.YamlSyntax, error.Code);
        Assert.True(error.HasLocation);
    }

    [Fact]
    public void TryParse_TopLevelList_ReportsWrongType()
    {
        var error = Assert.Single(RegistryLoader.TryParse("- version: 1\n", "list.yaml").Errors);

        Assert.Equal((RegistryDiagnosticCodes.WrongType, 1, 1), (error.Code, error.Line, error.Column));
    }

    [Theory]
    [InlineData("accept: .nan", RegistryDiagnosticCodes.OutOfRange)]
    [InlineData("accept: -.inf", RegistryDiagnosticCodes.OutOfRange)]
    [InlineData("accept: -1.01", RegistryDiagnosticCodes.OutOfRange)]
    [InlineData("accept: \"0.6\"", RegistryDiagnosticCodes.WrongType)]
    [InlineData("accept: [0.6]", RegistryDiagnosticCodes.WrongType)]
    [InlineData("margin: 0,05", RegistryDiagnosticCodes.WrongType)]
    public void TryParse_BadThreshold_IsRefused(string line, string code)
    {
        string yaml = RegistryFixtures.TwoTasks.Replace("    title: Press the hall light switch", "    title: Press the hall light switch\n    " + line);

        var error = Assert.Single(RegistryLoader.TryParse(yaml, "r.yaml").Errors);

        Assert.Equal((code, 5, line.IndexOf(':') + 7), (error.Code, error.Line, error.Column));
    }

    [Theory]
    [InlineData("accept: -1", -1f)]
    [InlineData("accept: 1", 1f)]
    [InlineData("accept: 1e-1", 0.1f)]
    [InlineData("accept: +.75", 0.75f)]
    public void Parse_ThresholdAtOrInsideTheBounds_IsRead(string line, float expected)
    {
        string yaml = RegistryFixtures.TwoTasks.Replace("    title: Press the hall light switch", "    title: Press the hall light switch\n    " + line);

        Assert.Equal(expected, RegistryLoader.Parse(yaml, "r.yaml").Find("hall-light")!.Accept);
    }

    [Fact]
    public void Parse_Scoring_IsRecordedInSettings()
    {
        string yaml = RegistryFixtures.TwoTasks.Replace("version: 1", "version: 1\nscoring: top-k\nallow_words: [cut]");

        var settings = RegistryLoader.Parse(yaml, "r.yaml").Settings;

        Assert.Equal("top-k", settings.Scoring);
        Assert.Equal(["cut"], settings.AllowWords);
    }

    [Fact]
    public void Options_OutOfRangeValue_ThrowsWhenSet()
    {
        Assert.Throws<ArgumentOutOfRangeException>(() => new RegistryLoadOptions { MaxFileBytes = 0 });
        Assert.Throws<ArgumentOutOfRangeException>(() => new RegistryLoadOptions { MaxDepth = 3 });
        Assert.Throws<ArgumentOutOfRangeException>(() => new RegistryLoadOptions { MaxTasks = 0 });
    }

    [Fact]
    public void RegistryException_WithoutErrors_IsRefused()
    {
        var warning = new RegistryDiagnostic(DiagnosticSeverity.Warning, "duplicate-must-reject", "m", "r.yaml", 1, 1);

        Assert.Throws<ArgumentException>(() => new RegistryException([warning]));
    }
}
