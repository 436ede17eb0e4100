using TaskPhrase.Evaluation;

namespace TaskPhrase.Tests.Evaluation;

public class ProbeGeneratorPcg32Tests
{
    [Fact]
    public void NextUInt_ReferenceSeed_MatchesPublishedDemoOutput()
    {
        // pcg-c-basic, pcg32-demo.c (O'Neill, pcg-random.org): pcg32_srandom_r(&rng, 42u, 54u) then six draws print
        // 0xa15c02b7 0x7b47f409 0xba1d3330 0x83d2f293 0xbfa4784b 0xcbed606e; the same values, in decimal, are the
        // expected output of test/test_pcg.jl in the Raytracer.jl repository (Paolo97Gll/Raytracer.jl).
        var rng = new Pcg32(42, 54);
        uint[] expected = [0xa15c02b7, 0x7b47f409, 0xba1d3330, 0x83d2f293, 0xbfa4784b, 0xcbed606e];
        Assert.Equal(expected, Enumerable.Range(0, 6).Select(_ => rng.NextUInt()).ToArray());
    }

    [Fact]
    public void Next_Bound_StaysInRangeAndCoversIt()
    {
        var rng = new Pcg32(7, 1);
        var counts = new int[6];
        for (int i = 0; i < 6000; i++) counts[rng.Next(6)]++;
        // Each face 1000 expected; 5 standard deviations (sqrt(6000 * 1/6 * 5/6) = 28.9) either way.
        Assert.All(counts, c => Assert.InRange(c, 1000 - 145, 1000 + 145));
    }

    [Fact]
    public void StreamOf_DifferentKinds_GiveDifferentStreams()
        => Assert.Equal(ProbeKinds.All.Count, ProbeKinds.All.Select(Pcg32.StreamOf).Distinct().Count());
}
