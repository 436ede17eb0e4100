using TaskPhrase.Evaluation;
using TaskPhrase.Registry;
using TaskPhrase.Text;

namespace TaskPhrase.Tests.Evaluation;

public class ProbeGeneratorTests
{
    private static readonly TaskRegistry Harbor = ProbeGeneratorTestRegistry.Harbor();

    private static IReadOnlyList<ProbeCase> Generate(ulong seed, int count = 260, IReadOnlyList<string>? kinds = null)
        => ProbeGenerator.Generate(Harbor, new ProbeGeneratorOptions { Seed = seed, Count = count, Kinds = kinds ?? ProbeKinds.All });

    private static HashSet<string> Vocabulary() => Harbor.Tasks
        .SelectMany(t => t.Phrases.Concat(t.MustReject).Concat(t.AlsoWords))
        .SelectMany(ProbeGenerator.WordsOf).ToHashSet(StringComparer.Ordinal);

    [Fact]
    public void Generate_SameSeed_GivesSameRows()
        => Assert.Equal(Generate(42), Generate(42));

    [Fact]
    public void Generate_DifferentSeeds_GiveDifferentRows()
    {
        var a = Generate(1).Select(r => r.Utterance).ToHashSet();
        var b = Generate(2).Select(r => r.Utterance).ToList();
        // Small kinds (symbols, repeated) can collide by chance; most rows must differ.
        Assert.True(b.Count(u => !a.Contains(u)) > b.Count / 2, "seeds 1 and 2 gave mostly the same rows");
    }

    [Fact]
    public void Generate_EnoughRows_GivesEveryKindAndExactCount()
    {
        var rows = Generate(3, count: 13 * 12);
        Assert.Equal(13 * 12, rows.Count);
        Assert.Equal(ProbeKinds.All.Order(), rows.Select(r => r.Kind!).Distinct().Order());
        Assert.All(ProbeKinds.All, k => Assert.Equal(12, rows.Count(r => r.Kind == k)));
    }

    [Fact]
    public void Generate_SelectedKinds_GivesOnlyThose()
    {
        var rows = Generate(5, count: 40, kinds: [ProbeKinds.Typo, ProbeKinds.Symbols]);
        Assert.Equal(40, rows.Count);
        Assert.All(rows, r => Assert.Contains(r.Kind, new[] { ProbeKinds.Typo, ProbeKinds.Symbols }));
    }

    [Fact]
    public void Generate_KindRunsOut_ShortfallGoesToOtherKinds()
    {
        // The out-of-domain bank has about a hundred entries; asking for 300 rows of it and typos fills up with typos.
        var rows = Generate(6, count: 300, kinds: [ProbeKinds.OutOfDomain, ProbeKinds.Typo]);
        Assert.Equal(300, rows.Count);
        int bank = rows.Count(r => r.Kind == ProbeKinds.OutOfDomain);
        Assert.InRange(bank, 80, OutOfDomainBank.Requests.Count);
    }

    [Theory]
    [InlineData(1ul)]
    [InlineData(99ul)]
    [InlineData(123456789ul)]
    public void Generate_AnySeed_NoRowEqualsAnApprovedPhrase(ulong seed)
    {
        var approved = Harbor.Tasks.SelectMany(t => t.Phrases).Select(TextNormalizer.MatchKey).ToHashSet();
        Assert.All(Generate(seed, count: 520), r => Assert.DoesNotContain(TextNormalizer.MatchKey(r.Utterance), approved));
    }

    [Fact]
    public void Generate_AnySeed_RowsAreUnique()
    {
        var rows = Generate(11, count: 520);
        Assert.Equal(rows.Count, rows.Select(r => TextNormalizer.Normalize(r.Utterance).ToLowerInvariant()).Distinct().Count());
        var keys = rows.Select(r => TextNormalizer.MatchKey(r.Utterance)).Where(k => k.Length > 0).ToList();
        Assert.Equal(keys.Count, keys.Distinct().Count());
    }

    [Fact]
    public void Generate_ExpectationsFollowKind()
    {
        var ids = Harbor.Tasks.Select(t => t.Id).ToHashSet();
        foreach (var row in Generate(8, count: 520))
        {
            if (ProbeKinds.ExpectsTask(row.Kind!))
            {
                Assert.Contains(row.Expect, ids);
                // The note names the approved phrase the row came from, and that phrase belongs to the expected task.
                var source = Harbor.Find(row.Expect)!.Phrases.SingleOrDefault(p => row.Note!.EndsWith($"'{p}'", StringComparison.Ordinal));
                Assert.True(source is not null, $"{row.Kind} row '{row.Utterance}' note '{row.Note}' names no phrase of {row.Expect}");
            }
            else
            {
                Assert.Equal(ProbeCase.Reject, row.Expect);
            }
            Assert.False(string.IsNullOrWhiteSpace(row.Note));
            Assert.StartsWith(row.Kind + ":", row.Note);
        }
    }

    [Fact]
    public void Generate_InScopeRows_NeverEqualMustRejectPhrases()
    {
        var mustReject = Harbor.Tasks.SelectMany(t => t.MustReject).Select(TextNormalizer.MatchKey).ToHashSet();
        Assert.All(Generate(12, count: 520).Where(r => ProbeKinds.ExpectsTask(r.Kind!)),
            r => Assert.DoesNotContain(TextNormalizer.MatchKey(r.Utterance), mustReject));
    }

    [Fact]
    public void Generate_RejectKinds_CarryWhatMakesThemWrong()
    {
        var vocabulary = Vocabulary();
        string[] cues = ["don't", "do not", "never", "no longer"];
        var rows = Generate(13, count: 520);
        foreach (var r in rows)
        {
            var words = ProbeGenerator.WordsOf(r.Utterance);
            switch (r.Kind)
            {
                case ProbeKinds.Negated:
                    Assert.Contains(cues, c => (" " + r.Utterance + " ").Contains(" " + c + " ", StringComparison.Ordinal));
                    break;
                case ProbeKinds.HazardSwap:
                    // The harmful action words listed in the design brief.
                    Assert.Contains(words, w => new[] { "throw", "hit", "strike", "stab", "poke", "cut", "smash", "drop", "push", "shove",
                        "punch", "kick", "burn", "pour", "spray", "point", "squeeze", "swing", "crush", "break", "hurl", "slam" }.Contains(w));
                    break;
                case ProbeKinds.TargetSwap:
                    Assert.Contains(words, w => new[] { "face", "eyes", "head", "neck", "mouth", "throat", "nose", "ear", "cat", "dog",
                        "baby", "carer", "visitor", "nurse", "neighbour" }.Contains(w));
                    break;
                case ProbeKinds.ObjectSwap:
                    Assert.Contains(words, w => !vocabulary.Contains(w));
                    break;
                case ProbeKinds.WordSalad:
                    Assert.InRange(words.Length, 3, 7);
                    Assert.All(words, w => Assert.Contains(w, vocabulary));
                    break;
                case ProbeKinds.PseudoWord:
                    Assert.All(words, w => Assert.Matches("^([bdfgklmnprstvz][aeiou][bdfgklmnprstvz]?){2,3}$", w));
                    Assert.All(words, w => Assert.DoesNotContain(w, vocabulary));
                    break;
                case ProbeKinds.KeyboardMash:
                    Assert.All(r.Utterance, ch => Assert.Contains(ch, "qwertyuiopasdfghjkl;zxcvbnm,./ "));
                    Assert.True(r.Utterance.Trim().Length >= 4);
                    break;
                case ProbeKinds.Repeated:
                    Assert.Single(words.Distinct());
                    Assert.InRange(words.Length, 2, 6);
                    break;
                case ProbeKinds.Symbols:
                    Assert.DoesNotContain(r.Utterance, char.IsLetterOrDigit);
                    break;
                case ProbeKinds.OutOfDomain:
                    Assert.Contains(r.Utterance, OutOfDomainBank.Requests);
                    break;
            }
        }
    }

    [Fact]
    public void Generate_EmptyRegistry_StillGivesNonsenseRows()
    {
        var empty = new TaskRegistry([], RegistryDefaults.Standard, new string('0', 64));
        var rows = ProbeGenerator.Generate(empty, new ProbeGeneratorOptions { Count = 30 });
        Assert.Equal(30, rows.Count);
        Assert.All(rows, r => Assert.Equal(ProbeCase.Reject, r.Expect));
        Assert.DoesNotContain(rows, r => r.Kind is ProbeKinds.Typo or ProbeKinds.Negated or ProbeKinds.WordSalad);
    }

    [Fact]
    public void Generate_TaskVocabularyCoversBankEntry_EntryIsLeftOut()
    {
        // A registry that teaches "make me a cup of coffee": the bank entry of that wording must not come out as 'reject'.
        var cafe = new TaskRegistry(
        [
            new TaskDefinition { Id = "coffee", Title = "Coffee", Controller = new("pour-arc.v2", 2), Phrases = ["make a cup of coffee", "coffee for me"] },
        ], RegistryDefaults.Standard, new string('0', 64));
        var rows = ProbeGenerator.Generate(cafe, new ProbeGeneratorOptions { Count = 200, Kinds = [ProbeKinds.OutOfDomain] });
        Assert.DoesNotContain(rows, r => r.Utterance == "make me a cup of coffee");
        Assert.Contains(rows, r => r.Utterance == "call my sister");
    }

    [Fact]
    public void Options_UnknownKind_ThrowsWithSuggestion()
    {
        var ex = Assert.Throws<ArgumentException>(() => new ProbeGeneratorOptions { Kinds = ["typos"] });
        Assert.Contains("'typos'", ex.Message);
        Assert.Contains("Did you mean 'typo'?", ex.Message);
        Assert.Contains("asr-slip", ex.Message);
    }

    [Fact]
    public void Options_CountBelowOne_Throws()
        => Assert.Throws<ArgumentOutOfRangeException>(() => new ProbeGeneratorOptions { Count = 0 });

    [Fact]
    public void OutOfDomainBank_HasEnoughUniquePlainRequests()
    {
        var keys = OutOfDomainBank.Requests.Select(TextNormalizer.MatchKey).ToList();
        Assert.True(keys.Distinct().Count() >= 80, $"{keys.Distinct().Count()} unique requests");
        Assert.Equal(keys.Count, keys.Distinct().Count());
        // Plain lower-case speech style: letters, spaces and apostrophes only.
        Assert.All(OutOfDomainBank.Requests, r => Assert.Matches("^[a-z' ]+$", r));
    }

    [Fact]
    public void OutOfDomainBank_MentionsNoHarborTaskId()
    {
        foreach (string id in Harbor.Tasks.Select(t => t.Id))
        {
            string spaced = id.Replace('-', ' ');
            Assert.All(OutOfDomainBank.Requests, r =>
            {
                Assert.DoesNotContain(id, r, StringComparison.Ordinal);
                Assert.False((" " + r + " ").Contains(" " + spaced + " ", StringComparison.Ordinal), $"'{r}' mentions task '{id}'");
            });
        }
    }

    [Fact]
    public void OutOfDomainBank_NoEntryIsAnApprovedPhrase()
    {
        var approved = Harbor.Tasks.SelectMany(t => t.Phrases).Select(TextNormalizer.MatchKey).ToHashSet();
        Assert.All(OutOfDomainBank.Requests, r => Assert.DoesNotContain(TextNormalizer.MatchKey(r), approved));
    }
}
