using Microsoft.Extensions.AI;
using TaskPhrase.Registry;
using TaskPhrase.Tests.TestDoubles;

namespace TaskPhrase.Tests.Registry;

/// <summary>
/// Lint over hand-chosen vectors. Phrases get unit vectors at chosen angles in a plane (or on separate axes), so
/// every expected cosine is a textbook value: cos θ between unit vectors θ apart.
/// </summary>
public class RegistryLinterTests
{
    private const float Tolerance = 1e-5f;

    private static float[] Angle(double degrees, int dims = 4)
    {
        var v = new float[dims];
        v[0] = (float)Math.Cos(degrees * Math.PI / 180);
        v[1] = (float)Math.Sin(degrees * Math.PI / 180);
        return v;
    }

    private static float[] Axis(int index, int dims = 4)
    {
        var v = new float[dims];
        v[index] = 1;
        return v;
    }

    private static float Cos(double degrees) => (float)Math.Cos(degrees * Math.PI / 180);

    /// <summary>A registry of the given tasks; each task is (id, confirm, phrases).</summary>
    private static TaskRegistry Registry(params (string Id, bool Confirm, string[] Phrases)[] tasks)
    {
        var yaml = new System.Text.StringBuilder("version: 1\ntasks:\n");
        foreach (var (id, confirm, phrases) in tasks)
        {
            yaml.Append($"  - id: {id}\n    title: {id}\n    confirm: {(confirm ? "true" : "false")}\n");
            yaml.Append("    controller: {manifold: m.v1, latent_dims: 1}\n    phrases:\n");
            foreach (var p in phrases) yaml.Append($"      - \"{p}\"\n");
        }
        return RegistryLoader.Parse(yaml.ToString(), "lint.yaml");
    }

    private static Task<IReadOnlyList<LintWarning>> Lint(TaskRegistry registry, ScriptedEmbeddingGenerator generator, LintOptions? options = null)
        => RegistryLinter.LintAsync(registry, generator, options ?? new LintOptions { MinPhrases = 1 });

    [Fact]
    public async Task LintAsync_PhraseNearAnotherTasksPhrase_WarnsNamingBothAndTheCosine()
    {
        var registry = Registry(
            ("water-basil", false, ["water the basil", "give the basil a drink"]),
            ("kettle-pour", false, ["pour the kettle into the teapot", "fill the teapot from the kettle"]));
        var generator = new ScriptedEmbeddingGenerator(new Dictionary<string, float[]>
        {
            ["water the basil"] = Angle(0),
            ["give the basil a drink"] = Axis(2),
            ["pour the kettle into the teapot"] = Angle(20), // cos 20° = 0.9397 to "water the basil": a collision
            ["fill the teapot from the kettle"] = Angle(90),
        });

        var warnings = await Lint(registry, generator);

        var collision = Assert.Single(warnings, w => w.Code == LintCodes.CrossTaskCollision);
        Assert.Equal(("water-basil", "water the basil", "kettle-pour", "pour the kettle into the teapot"),
            (collision.TaskId, collision.Phrase, collision.OtherTaskId, collision.OtherPhrase));
        Assert.Equal(Cos(20), collision.Similarity!.Value, Tolerance);
        Assert.Contains("'water the basil'", collision.Message, StringComparison.Ordinal);
        Assert.Contains("'pour the kettle into the teapot'", collision.Message, StringComparison.Ordinal);
        Assert.Contains("0.940", collision.Message, StringComparison.Ordinal);
    }

    [Fact]
    public async Task LintAsync_PhraseCloserToAnotherTasksCentroid_Warns()
    {
        // water-basil: a0 = 0°, a1 = axis 2.  kettle-pour: b0 = 20°, b1 = 90°.
        // b0: rest of its task is b1, cosine sin 20° = 0.342; water-basil's centroid is (a0 + a1)/√2, cosine cos 20°/√2 = 0.664.
        // a0: rest of its task is a1, cosine 0; kettle-pour's centroid is (b0 + b1)/|b0 + b1|, cosine cos 20°/|b0 + b1|.
        // a1 and b1 are orthogonal to the other task's centroid (cosine 0), so they are not flagged.
        var registry = Registry(
            ("water-basil", false, ["water the basil", "give the basil a drink"]),
            ("kettle-pour", false, ["pour the kettle into the teapot", "fill the teapot from the kettle"]));
        var generator = new ScriptedEmbeddingGenerator(new Dictionary<string, float[]>
        {
            ["water the basil"] = Angle(0),
            ["give the basil a drink"] = Axis(2),
            ["pour the kettle into the teapot"] = Angle(20),
            ["fill the teapot from the kettle"] = Angle(90),
        });
        double kettleCentroidNorm = Math.Sqrt(Math.Pow(Cos(20), 2) + Math.Pow(Math.Sin(20 * Math.PI / 180) + 1, 2));

        var warnings = (await Lint(registry, generator)).Where(w => w.Code == LintCodes.CloserToOtherTask).ToList();

        Assert.Equal(2, warnings.Count);
        Assert.Equal(("water-basil", "water the basil", "kettle-pour", "pour the kettle into the teapot"),
            (warnings[0].TaskId, warnings[0].Phrase, warnings[0].OtherTaskId, warnings[0].OtherPhrase));
        Assert.Equal((float)(Cos(20) / kettleCentroidNorm), warnings[0].Similarity!.Value, Tolerance);
        Assert.Equal(("kettle-pour", "pour the kettle into the teapot", "water-basil", "water the basil"),
            (warnings[1].TaskId, warnings[1].Phrase, warnings[1].OtherTaskId, warnings[1].OtherPhrase));
        Assert.Equal((float)(Cos(20) / Math.Sqrt(2)), warnings[1].Similarity!.Value, Tolerance);
        Assert.Contains("(0.342)", warnings[1].Message, StringComparison.Ordinal);
    }

    [Fact]
    public async Task LintAsync_TwoPhrasesOfATaskNearlyTheSame_WarnsRedundantWording()
    {
        var registry = Registry(("water-basil", false, ["water the basil", "please water the basil", "give the basil a drink"]));
        var generator = new ScriptedEmbeddingGenerator(new Dictionary<string, float[]>
        {
            ["water the basil"] = Angle(0),
            ["please water the basil"] = Angle(10), // cos 10° = 0.985 ≥ 0.95
            ["give the basil a drink"] = Angle(30), // cos 20° and 30° to the others: below 0.95
        });

        var warnings = await Lint(registry, generator);

        var duplicate = Assert.Single(warnings, w => w.Code == LintCodes.NearDuplicate);
        Assert.Equal(("water-basil", "water the basil", "water-basil", "please water the basil"),
            (duplicate.TaskId, duplicate.Phrase, duplicate.OtherTaskId, duplicate.OtherPhrase));
        Assert.Equal(Cos(10), duplicate.Similarity!.Value, Tolerance);
    }

    [Fact]
    public async Task LintAsync_ConfirmTaskPhraseNearNonConfirmPhrase_Warns()
    {
        var registry = Registry(
            ("water-basil", false, ["pour water on the basil"]),
            ("kettle-pour", true, ["pour the kettle into the teapot"]),
            ("blanket", true, ["pull the blanket over my knees"]));
        var generator = new ScriptedEmbeddingGenerator(new Dictionary<string, float[]>
        {
            ["pour water on the basil"] = Angle(0),
            ["pour the kettle into the teapot"] = Angle(40), // cos 40° = 0.766: above 0.70, below the 0.80 collision bound
            ["pull the blanket over my knees"] = Angle(75),  // cos 35° = 0.819 to the kettle, but both are confirm tasks
        });

        var warnings = await Lint(registry, generator);

        var confirm = Assert.Single(warnings, w => w.Code == LintCodes.ConfirmNearNonConfirm);
        Assert.Equal(("kettle-pour", "pour the kettle into the teapot", "water-basil", "pour water on the basil"),
            (confirm.TaskId, confirm.Phrase, confirm.OtherTaskId, confirm.OtherPhrase));
        Assert.Equal(Cos(40), confirm.Similarity!.Value, Tolerance);
        var collision = Assert.Single(warnings, w => w.Code == LintCodes.CrossTaskCollision);
        Assert.Equal(("kettle-pour", "blanket"), (collision.TaskId, collision.OtherTaskId));
        Assert.Equal(Cos(35), collision.Similarity!.Value, Tolerance);
    }

    [Fact]
    public async Task LintAsync_WellSeparatedTasks_GiveNoWarnings()
    {
        string[] basil = ["water the basil", "give the basil a drink", "the basil needs water", "water my herbs please", "pour some water on the basil"];
        string[] light = ["turn on the hall light", "press the hall light switch", "switch the hall light on", "put the light on in the hallway", "hit the light switch in the hall"];
        var registry = Registry(("water-basil", false, basil), ("hall-light", false, light));
        // Each phrase: its task's axis (0 or 1) plus 0.3 on an axis of its own, so phrases of one task have cosine
        // 1/1.09 = 0.917 (< 0.95) and phrases of different tasks cosine 0.
        var vectors = new Dictionary<string, float[]>();
        for (int i = 0; i < 5; i++)
        {
            var a = new float[12]; a[0] = 1; a[2 + i] = 0.3f; vectors[basil[i]] = a;
            var b = new float[12]; b[1] = 1; b[7 + i] = 0.3f; vectors[light[i]] = b;
        }

        var warnings = await RegistryLinter.LintAsync(registry, new ScriptedEmbeddingGenerator(vectors));

        Assert.Empty(warnings);
    }

    [Fact]
    public async Task LintAsync_AllPhrases_AreEmbeddedInOneCallInRegistryOrder()
    {
        var registry = RegistryLoader.Load(RegistryFixtures.Valid("small.yaml"));
        var phrases = registry.Tasks.SelectMany(t => t.Phrases).ToList();
        var generator = new ScriptedEmbeddingGenerator(phrases.Select((p, i) => KeyValuePair.Create(p, Axis(i, phrases.Count))));

        await RegistryLinter.LintAsync(registry, generator);

        var call = Assert.Single(generator.Calls);
        Assert.Equal(phrases, call);
    }

    [Theory]
    [InlineData(4, true)]
    [InlineData(5, false)]
    public async Task LintAsync_TaskWithFewPhrases_Warns(int count, bool expected)
    {
        var phrases = Enumerable.Range(1, count).Select(i => $"water the basil number {i}").ToArray();
        var registry = Registry(("water-basil", false, phrases));
        var generator = new ScriptedEmbeddingGenerator(phrases.Select((p, i) => KeyValuePair.Create(p, Axis(i, 8))));

        var warnings = await RegistryLinter.LintAsync(registry, generator);

        Assert.Equal(expected, warnings.Any(w => w.Code == LintCodes.FewPhrases && w.TaskId == "water-basil" && w.Phrase is null));
        Assert.Equal(expected ? 1 : 0, warnings.Count);
    }

    [Theory]
    [InlineData("don't water the basil", "don't")]
    [InlineData("don\u2019t water the basil", "don't")]
    [InlineData("dont water the basil", "dont")]
    [InlineData("do not water the basil", "do not")]
    [InlineData("never mind the basil", "never")]
    [InlineData("the basil no longer needs water", "no longer")]
    [InlineData("it is not the basil", "not")]
    [InlineData("stop watering the basil", "stop")]
    [InlineData("I can't reach the basil", "can't")]
    [InlineData("Do Not water the basil!", "do not")]
    [InlineData("water the basil", null)]
    [InlineData("note the basil", null)]
    [InlineData("knot the string round the basil", null)]
    [InlineData("start the stopwatch", null)]
    [InlineData("do water the basil now", null)]
    public async Task LintAsync_NegationInPhrase_IsFlagged(string phrase, string? negation)
    {
        var registry = Registry(("water-basil", false, [phrase]));
        var generator = new ScriptedEmbeddingGenerator(new Dictionary<string, float[]> { [phrase] = Axis(0) });

        var warnings = await Lint(registry, generator);

        var found = warnings.SingleOrDefault(w => w.Code == LintCodes.NegationInPhrase);
        if (negation is null)
        {
            Assert.Null(found);
        }
        else
        {
            Assert.NotNull(found);
            Assert.Equal(phrase, found.Phrase);
            Assert.Contains($"'{negation}'", found.Message, StringComparison.Ordinal);
        }
    }

    [Theory]
    [InlineData("lights", LintCodes.ShortPhrase)]
    [InlineData("lights!", LintCodes.ShortPhrase)]
    [InlineData("hall light", null)]
    [InlineData("one two three four five six seven eight nine ten eleven twelve thirteen fourteen fifteen sixteen seventeen eighteen nineteen twenty", null)]
    [InlineData("one two three four five six seven eight nine ten eleven twelve thirteen fourteen fifteen sixteen seventeen eighteen nineteen twenty twenty-one", LintCodes.LongPhrase)]
    public async Task LintAsync_PhraseLength_IsChecked(string phrase, string? code)
    {
        // "twenty-one" is two words: the hyphen splits words like any punctuation but the apostrophe.
        var registry = Registry(("hall-light", false, [phrase]));
        var generator = new ScriptedEmbeddingGenerator(new Dictionary<string, float[]> { [phrase] = Axis(0) });

        var warnings = await Lint(registry, generator);

        Assert.Equal(code is null ? [] : new[] { code }, warnings.Select(w => w.Code));
    }

    [Fact]
    public async Task LintAsync_CustomBounds_AreUsed()
    {
        var registry = Registry(("water-basil", false, ["water the basil"]), ("hall-light", false, ["turn on the hall light"]));
        var generator = new ScriptedEmbeddingGenerator(new Dictionary<string, float[]>
        {
            ["water the basil"] = Angle(0),
            ["turn on the hall light"] = Angle(60), // cos 60° = 0.5
        });

        var strict = await Lint(registry, generator, new LintOptions { MinPhrases = 1, CollisionSimilarity = 0.5f });
        var loose = await Lint(registry, generator, new LintOptions { MinPhrases = 1, CollisionSimilarity = 0.51f });

        Assert.Single(strict, w => w.Code == LintCodes.CrossTaskCollision);
        Assert.DoesNotContain(loose, w => w.Code == LintCodes.CrossTaskCollision);
    }

    [Fact]
    public async Task LintAsync_GeneratorReturnsTooFewVectors_Throws()
    {
        var registry = Registry(("water-basil", false, ["water the basil", "give the basil a drink"]));

        var ex = await Assert.ThrowsAsync<InvalidOperationException>(() => RegistryLinter.LintAsync(registry, new OneVectorGenerator()));

        Assert.Contains("returned 1 vectors for 2 phrases", ex.Message, StringComparison.Ordinal);
    }

    [Fact]
    public async Task LintAsync_CancelledToken_Throws()
    {
        var registry = Registry(("water-basil", false, ["water the basil"]));
        var generator = new ScriptedEmbeddingGenerator(new Dictionary<string, float[]> { ["water the basil"] = Axis(0) });

        await Assert.ThrowsAnyAsync<OperationCanceledException>(
            () => RegistryLinter.LintAsync(registry, generator, null, new CancellationToken(canceled: true)));
        Assert.Empty(generator.Calls);
    }

    [Fact]
    public void LintOptions_BoundOutsideCosineRange_Throws()
    {
        Assert.Throws<ArgumentOutOfRangeException>(() => new LintOptions { CollisionSimilarity = 1.5f });
        Assert.Throws<ArgumentOutOfRangeException>(() => new LintOptions { NearDuplicateSimilarity = float.NaN });
        Assert.Throws<ArgumentOutOfRangeException>(() => new LintOptions { MinPhrases = 0 });
    }

    /// <summary>A broken generator: always returns a single vector, whatever it is asked.</summary>
    private sealed class OneVectorGenerator : IEmbeddingGenerator<string, Embedding<float>>
    {
        public Task<GeneratedEmbeddings<Embedding<float>>> GenerateAsync(IEnumerable<string> values,
            EmbeddingGenerationOptions? options = null, CancellationToken cancellationToken = default)
            => Task.FromResult(new GeneratedEmbeddings<Embedding<float>>([new Embedding<float>(new float[] { 1, 0 })]));

        public object? GetService(Type serviceType, object? serviceKey = null) => null;

        public void Dispose()
        {
        }
    }
}
