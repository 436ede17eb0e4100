// A console app that uses TaskPhrase the way an app developer would: from NuGet packages, through
// dependency injection, with settings in appsettings.json. Run: dotnet run -- "could you water the basil"
using Microsoft.Extensions.AI;
using Microsoft.Extensions.DependencyInjection;
using Microsoft.Extensions.Hosting;
using TaskPhrase.Hosting;
using TaskPhrase.Resolution;

var builder = Host.CreateApplicationBuilder(new HostApplicationBuilderSettings { Args = args, ContentRootPath = AppContext.BaseDirectory });
builder.Services.AddTaskPhrase(builder.Configuration.GetSection(TaskPhraseOptions.SectionName));
// RegistryPath in appsettings.json is relative to the app folder.
builder.Services.PostConfigure<TaskPhraseOptions>(o =>
{
    if (o.RegistryPath is { } path && !Path.IsPathRooted(path)) o.RegistryPath = Path.Combine(AppContext.BaseDirectory, path);
});

using var host = builder.Build();
await host.StartAsync();   // validates the options, loads the model and the registry

var resolver = host.Services.GetRequiredService<TaskResolver>();
Console.WriteLine($"registry {resolver.Registry.ContentHash[..12]} ({resolver.Registry.Tasks.Count} tasks), model {resolver.Model.Id}");
string[] utterances = args.Length > 0 ? args : ["could you water the basil", "don't feed the fish", "what's the weather tomorrow"];
foreach (var r in resolver.ResolveMany(utterances))
{
    string what = r.Outcome == ResolutionOutcome.Accepted
        ? $"{r.Task!.Id} -> controller {r.Task.Controller.Manifold} ({r.Task.Controller.LatentDims} axes){(r.Confirm ? ", confirm first" : "")}"
        : $"{ResolutionJson.Name(r.Reason)} (do not move)";
    Console.WriteLine($"{ResolutionJson.Name(r.Outcome),-9} {r.Utterance}: {what}");
}

// The same embedder is registered as the .NET AI embedding interface, for any other code that needs vectors.
var generator = host.Services.GetRequiredService<IEmbeddingGenerator<string, Embedding<float>>>();
var embedding = await generator.GenerateAsync(["hang up my keys"]);
Console.WriteLine($"IEmbeddingGenerator: {embedding[0].Vector.Length} dimensions from {embedding[0].ModelId}");

await host.StopAsync();
