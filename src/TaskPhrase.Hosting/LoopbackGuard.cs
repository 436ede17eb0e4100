using System.Net;

namespace TaskPhrase.Hosting;

/// <summary>Checks listen addresses: the service binds to loopback only unless remote access is explicitly allowed.</summary>
internal static class LoopbackGuard
{
    /// <summary>Splits <paramref name="urls"/> on <c>;</c> and checks each address.</summary>
    /// <exception cref="ArgumentException">An address is malformed, not http, has a path, or is not loopback while <paramref name="allowRemote"/> is false.</exception>
    public static IReadOnlyList<string> Check(string urls, bool allowRemote)
    {
        var list = urls.Split(';', StringSplitOptions.RemoveEmptyEntries | StringSplitOptions.TrimEntries);
        if (list.Length == 0) throw new ArgumentException("No address to listen on; give one such as http://127.0.0.1:5077.", nameof(urls));
        foreach (var url in list)
        {
            bool wildcard = TryWildcard(url);
            if (!wildcard)
            {
                if (!Uri.TryCreate(url, UriKind.Absolute, out var uri) || uri.Port < 0)
                    throw new ArgumentException($"'{url}' is not a valid listen address; give one such as http://127.0.0.1:5077.", nameof(urls));
                if (uri.Scheme != Uri.UriSchemeHttp)
                    throw new ArgumentException($"'{url}': the service speaks plain http on loopback; use http://127.0.0.1:PORT (put a TLS proxy in front for remote access).", nameof(urls));
                if (uri.AbsolutePath != "/" || uri.Query.Length > 0)
                    throw new ArgumentException($"'{url}': a listen address cannot have a path; give scheme, host and port only (e.g. http://127.0.0.1:5077).", nameof(urls));
            }
            if (!allowRemote && (wildcard || !IsLoopback(url)))
                throw new ArgumentException(
                    $"Refusing to listen on '{url}': it is not a loopback address, so other machines could choose the arm's task. " +
                    "Use 127.0.0.1, [::1] or localhost, or allow remote access explicitly (AllowRemote, --allow-remote) on a trusted, access-controlled network.",
                    nameof(urls));
        }
        return list;
    }

    /// <summary>True when <paramref name="url"/> names a loopback host (127.0.0.0/8, ::1, localhost).</summary>
    public static bool IsLoopback(string url)
    {
        if (TryWildcard(url) || !Uri.TryCreate(url, UriKind.Absolute, out var uri)) return false;
        if (string.Equals(uri.Host, "localhost", StringComparison.OrdinalIgnoreCase)) return true;
        return IPAddress.TryParse(uri.Host.Trim('[', ']'), out var address) && IPAddress.IsLoopback(address);
    }

    // Kestrel's "any address" forms: http://*:5000, http://+:5000.
    private static bool TryWildcard(string url)
    {
        int scheme = url.IndexOf("://", StringComparison.Ordinal);
        if (scheme < 0) return false;
        string rest = url[(scheme + 3)..];
        return rest.StartsWith('*') || rest.StartsWith('+');
    }
}
