using TaskPhrase.Onnx;

namespace TaskPhrase.Tests.Embedding;

public class ModelLoadingTests
{
    [Fact]
    public void Create_MissingDirectory_ThrowsNamingIt()
    {
        var e = Assert.Throws<DirectoryNotFoundException>(() => OnnxEmbedder.Create("/nonexistent/model-dir"));
        Assert.Contains("/nonexistent/model-dir", e.Message);
    }

    [Fact]
    public void Create_DirectoryWithoutModel_ThrowsNamingMissingFile()
    {
        string dir = Directory.CreateTempSubdirectory("tp-model-").FullName;
        try
        {
            File.WriteAllText(Path.Combine(dir, "vocab.txt"), "[PAD]\n[UNK]\n[CLS]\n[SEP]\n");
            var e = Assert.Throws<InvalidDataException>(() => OnnxEmbedder.Create(dir));
            Assert.Contains("model.onnx", e.Message);
        }
        finally { Directory.Delete(dir, true); }
    }

    [Fact]
    public void Create_CardWithWrongHash_IsRefused()
    {
        string source = BuiltInModels.Locate();
        string dir = Directory.CreateTempSubdirectory("tp-model-").FullName;
        try
        {
            File.CreateSymbolicLink(Path.Combine(dir, "model.onnx"), Path.Combine(source, "model.onnx"));
            File.Copy(Path.Combine(source, "vocab.txt"), Path.Combine(dir, "vocab.txt"));
            File.WriteAllText(Path.Combine(dir, "model.json"), """{"id":"x","pooling":"mean","max_tokens":256,"dimensions":384,"model_sha256":"00"}""");
            var e = Assert.Throws<InvalidDataException>(() => OnnxEmbedder.Create(dir));
            Assert.Contains("SHA-256", e.Message);
        }
        finally { Directory.Delete(dir, true); }
    }

    [Fact]
    public void Create_CardWithWrongDimensions_NamesOutputNode()
    {
        string source = BuiltInModels.Locate();
        string dir = Directory.CreateTempSubdirectory("tp-model-").FullName;
        try
        {
            File.CreateSymbolicLink(Path.Combine(dir, "model.onnx"), Path.Combine(source, "model.onnx"));
            File.Copy(Path.Combine(source, "vocab.txt"), Path.Combine(dir, "vocab.txt"));
            File.WriteAllText(Path.Combine(dir, "model.json"), """{"id":"x","pooling":"mean","max_tokens":256,"dimensions":768}""");
            var e = Assert.Throws<InvalidDataException>(() => OnnxEmbedder.Create(dir));
            Assert.Contains("768", e.Message);
        }
        finally { Directory.Delete(dir, true); }
    }

    [Fact]
    public void Dispose_ThenEmbed_ThrowsObjectDisposed()
    {
        var embedder = OnnxEmbedder.CreateDefault();
        embedder.Dispose();
        Assert.Throws<ObjectDisposedException>(() => embedder.Embed("water the basil", new float[384]));
    }
}
