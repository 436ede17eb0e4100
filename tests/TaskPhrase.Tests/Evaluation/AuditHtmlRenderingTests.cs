using System.Diagnostics;
using System.Text.RegularExpressions;
using TaskPhrase.Evaluation;

namespace TaskPhrase.Tests.Evaluation;

/// <summary>Renders the HTML report in a real browser engine (headless Chromium), when one is installed.</summary>
public sealed class AuditHtmlRenderingTests : IDisposable
{
    private readonly string _dir = Directory.CreateTempSubdirectory("taskphrase-html-").FullName;
    private readonly string _html = AuditHtmlReport.ToHtml(AuditScenario.Report(), new AuditBudget(maxFalseAccept: 0.1), AuditScenario.TradeOff);

    public void Dispose() => Directory.Delete(_dir, recursive: true);

    [ChromiumFact]
    public void Chromium_DumpDom_ParsesReportWithoutRestructuring()
    {
        string page = WritePage();

        var (exit, stdout, stderr) = RunChromium("--dump-dom", new Uri(page).AbsoluteUri);

        Assert.True(exit == 0, $"chromium exited with {exit}: {stderr}");
        // The browser's parsed DOM keeps every chart, table and section of the source: nothing was misnested.
        foreach (var tag in new[] { "<svg ", "<table ", "<section ", "<figure", "<details" })
            Assert.Equal(Regex.Matches(_html, Regex.Escape(tag)).Count, Regex.Matches(stdout, Regex.Escape(tag)).Count);
        Assert.Equal(5, Regex.Matches(stdout, "<svg ").Count);
        // The trade-off chart survived parsing with one marker per reachable cap and the current operating point.
        Assert.Contains("<svg id=\"chart-tradeoff\"", stdout);
        Assert.Equal(4, Regex.Matches(stdout, "class=\"curve-point\"").Count);
        Assert.Contains("registry now", stdout);
        // The untrusted utterance stayed text: no script element appeared in the DOM.
        Assert.DoesNotContain("<script", stdout, StringComparison.OrdinalIgnoreCase);
        Assert.Contains("&lt;script&gt;alert(1)&lt;/script&gt;", stdout, StringComparison.Ordinal);
    }

    [ChromiumFact]
    public void Chromium_Screenshot_RendersAPng()
    {
        string page = WritePage();
        string png = Path.Combine(_dir, "report.png");

        var (exit, _, stderr) = RunChromium("--window-size=1100,2400", "--hide-scrollbars", $"--screenshot={png}", new Uri(page).AbsoluteUri);

        Assert.True(exit == 0, $"chromium exited with {exit}: {stderr}");
        byte[] bytes = File.ReadAllBytes(png);
        // PNG signature (ISO/IEC 15948, section 5.2) and a width of 1100 in the IHDR chunk.
        Assert.Equal(new byte[] { 0x89, 0x50, 0x4E, 0x47, 0x0D, 0x0A, 0x1A, 0x0A }, bytes[..8]);
        Assert.Equal(1100, (bytes[16] << 24) | (bytes[17] << 16) | (bytes[18] << 8) | bytes[19]);
        Assert.True(bytes.Length > 50_000, $"a {bytes.Length}-byte screenshot is too small to hold the rendered report");
    }

    private string WritePage()
    {
        string page = Path.Combine(_dir, "report.html");
        File.WriteAllText(page, _html);
        return page;
    }

    private (int Exit, string Stdout, string Stderr) RunChromium(params string[] args)
    {
        var info = new ProcessStartInfo(ChromiumFactAttribute.Path)
        {
            RedirectStandardOutput = true,
            RedirectStandardError = true,
            UseShellExecute = false,
        };
        foreach (var a in new[] { "--headless", "--no-sandbox", "--disable-gpu", "--no-first-run", $"--user-data-dir={Path.Combine(_dir, "profile")}" }) info.ArgumentList.Add(a);
        foreach (var a in args) info.ArgumentList.Add(a);
        using var process = Process.Start(info)!;
        var stdout = process.StandardOutput.ReadToEndAsync();
        var stderr = process.StandardError.ReadToEndAsync();
        if (!process.WaitForExit(TimeSpan.FromSeconds(90)))
        {
            process.Kill(entireProcessTree: true);
            Assert.Fail("chromium did not finish within 90 s");
        }
        return (process.ExitCode, stdout.Result, stderr.Result);
    }
}
