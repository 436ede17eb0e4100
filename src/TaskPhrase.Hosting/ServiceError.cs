namespace TaskPhrase.Hosting;

/// <summary>A request the service refuses: HTTP status, a stable error code and a message saying what was wrong and what to send.</summary>
internal sealed class ServiceError(int status, string code, string message) : Exception(message)
{
    public int Status { get; } = status;

    public string Code { get; } = code;

    public static ServiceError BadRequest(string message) => new(400, "invalid_request", message);
}
