using Microsoft.Extensions.DependencyInjection;
using Microsoft.Extensions.Hosting;
using Microsoft.Extensions.Options;

namespace TaskPhrase.Hosting;

/// <summary>Loads the registry when the host starts (so a broken file stops the start) and watches it while the host runs.</summary>
internal sealed class RegistryWatchService(IServiceProvider services, IOptions<TaskPhraseOptions> options) : IHostedService
{
    public Task StartAsync(CancellationToken cancellationToken)
    {
        var reloader = services.GetRequiredService<RegistryReloader>();
        if (options.Value.WatchRegistry) reloader.StartWatching();
        return Task.CompletedTask;
    }

    public Task StopAsync(CancellationToken cancellationToken)
    {
        services.GetRequiredService<RegistryReloader>().StopWatching();
        return Task.CompletedTask;
    }
}
