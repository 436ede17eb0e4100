namespace TaskPhrase.Tests.Conditioning;

/// <summary>
/// The safetensors fixtures in tests/data/safetensors, written by make_fixtures.py — the independent
/// reference writer (Python standard library only, following the published format).
/// </summary>
internal static class Fixtures
{
    public static string Directory { get; } = System.IO.Path.Combine(AppContext.BaseDirectory, "data", "safetensors");

    public static string Path(string name) => System.IO.Path.Combine(Directory, name);

    public static byte[] Bytes(string name) => File.ReadAllBytes(Path(name));

    /// <summary>SHA-256 of a fixture as computed by Python's hashlib when the fixtures were written (SHA256SUMS).</summary>
    public static string ReferenceSha256(string name)
    {
        foreach (var line in File.ReadLines(Path("SHA256SUMS")))
        {
            var parts = line.Split("  ", 2);
            if (parts.Length == 2 && parts[1] == name)
            {
                return parts[0];
            }
        }

        throw new InvalidOperationException($"{name} is not listed in SHA256SUMS; run make_fixtures.py.");
    }

    /// <summary>The 2-layer generator's numbers exactly as make_fixtures.py writes them (d = 3, E = 4).</summary>
    public static class Film
    {
        public static readonly float[] Gamma0Weight = [0.5f, 0, 0, 0, 0, 0.25f, 0, 1, 1, 1, 1, 1];
        public static readonly float[] Gamma0Bias = [1, 0, -0.5f];
        public static readonly float[] Beta0Weight = [1, -1, 0, 0, 0, 0, 2, 0, 0, 0, 0, 4];
        public static readonly float[] Beta0Bias = [0, 0.5f, -1];
        public static readonly float[] Gamma1Weight = [0, 0, 0, 2, -1, 0, 0.5f, 0, 0.125f, 0.125f, 0, 0];
        public static readonly float[] Gamma1Bias = [0.5f, 1, 0];
        public static readonly float[] Beta1Weight = [0.5f, 0.5f, 0.5f, 0.5f, 0, -2, 0, 0, 1, 0, 0, -1];
        public static readonly float[] Beta1Bias = [-0.25f, 0, 2];
        public const string Note = "TaskPhrase test fixture; invented numbers";
    }
}
