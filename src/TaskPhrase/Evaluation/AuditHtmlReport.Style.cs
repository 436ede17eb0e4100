namespace TaskPhrase.Evaluation;

// The report's inline style sheet: system fonts only, print-friendly, readable at 200 % zoom.
public static partial class AuditHtmlReport
{
    private const string Css = """
        :root { --ink: #1d232b; --muted: #5b6572; --line: #d8dde3; --soft: #f4f6f8; --good: #0b7a55; --bad: #b3261e; --warn: #8a5a00; --accent: #0072B2; }
        * { box-sizing: border-box; }
        body { margin: 0; color: var(--ink); background: #fff; font: 15px/1.5 system-ui, -apple-system, "Segoe UI", Roboto, "Noto Sans", "Liberation Sans", sans-serif; }
        header, main, footer, nav { max-width: 1040px; margin: 0 auto; padding: 0 24px; }
        header { padding-top: 28px; padding-bottom: 12px; border-bottom: 1px solid var(--line); }
        .kicker { margin: 0; color: var(--muted); text-transform: uppercase; letter-spacing: .08em; font-size: 12px; }
        h1 { margin: 2px 0 10px; font-size: 28px; overflow-wrap: anywhere; }
        h2 { font-size: 20px; margin: 34px 0 10px; padding-bottom: 4px; border-bottom: 2px solid var(--soft); }
        .verdict { display: inline-block; margin: 0 0 12px; padding: 6px 12px; border-radius: 6px; font-weight: 600; }
        .verdict.pass { background: #e3f4ec; color: var(--good); }
        .verdict.fail { background: #fbe6e4; color: var(--bad); }
        dl.meta { display: grid; grid-template-columns: 1fr; gap: 2px; margin: 0; }
        dl.meta div { display: flex; gap: 12px; min-width: 0; }
        dl.meta dt { flex: 0 0 96px; color: var(--muted); }
        dl.meta dd { margin: 0; min-width: 0; overflow-wrap: anywhere; }
        code { font: 13px/1.4 ui-monospace, "SFMono-Regular", Menlo, Consolas, "Liberation Mono", monospace; }
        code.hash { font-size: 12px; color: var(--muted); word-break: break-all; }
        nav { display: flex; flex-wrap: wrap; gap: 4px 16px; padding-top: 10px; padding-bottom: 10px; font-size: 14px; }
        nav a { color: var(--accent); text-decoration: none; }
        nav a:hover, nav a:focus { text-decoration: underline; }
        .lead { color: var(--muted); margin-top: 0; max-width: 80ch; }
        ul.findings { list-style: none; padding: 0; margin: 0; }
        ul.findings li { padding: 8px 12px; margin: 6px 0; border-left: 4px solid var(--line); background: var(--soft); border-radius: 0 6px 6px 0; }
        ul.findings li.bad { border-color: var(--bad); }
        ul.findings li.warn { border-color: #e0a100; }
        ul.findings li.good { border-color: var(--good); }
        ul.findings .utt::before { content: "\201C"; }
        ul.findings .utt::after { content: "\201D"; }
        table { border-collapse: collapse; width: 100%; margin: 8px 0 16px; }
        caption { text-align: left; color: var(--muted); font-size: 13px; padding-bottom: 6px; caption-side: top; }
        th, td { padding: 6px 8px; border-bottom: 1px solid var(--line); text-align: left; vertical-align: top; }
        thead th { font-size: 13px; color: var(--muted); font-weight: 600; border-bottom: 2px solid var(--line); white-space: nowrap; }
        td.num, th.num { text-align: right; font-variant-numeric: tabular-nums; white-space: nowrap; }
        .big { font-size: 18px; font-weight: 600; }
        .muted { color: var(--muted); }
        table.metrics th[scope=row] { font-weight: normal; }
        table.metrics .metric { display: block; font-weight: 600; }
        table.metrics code { color: var(--muted); font-size: 12px; }
        table.metrics .help { display: block; color: var(--muted); font-size: 13px; }
        .pass { color: var(--good); font-weight: 600; white-space: nowrap; }
        .fail { color: var(--bad); font-weight: 600; white-space: nowrap; }
        .ci-col { width: 170px; }
        .ci-bar { position: relative; display: inline-block; width: 150px; height: 10px; margin-top: 6px; background: var(--soft); border: 1px solid var(--line); border-radius: 5px; vertical-align: middle; }
        .ci-bar.empty { opacity: .4; }
        .ci-range { position: absolute; top: 1px; bottom: 1px; background: #9cc3de; border-radius: 3px; }
        .ci-point { position: absolute; top: -3px; width: 2px; height: 14px; margin-left: -1px; background: var(--ink); }
        .ci-cell { white-space: nowrap; }
        .ci-cell .ci-bar { width: 90px; margin: 0 8px 0 0; }
        .counts { color: var(--muted); }
        figure { margin: 0 0 8px; }
        figcaption { color: var(--muted); font-size: 13px; max-width: 70ch; }
        svg.chart { display: block; max-width: 100%; height: auto; }
        svg text { font-family: system-ui, -apple-system, "Segoe UI", Roboto, "Noto Sans", "Liberation Sans", sans-serif; font-size: 12px; fill: var(--ink); }
        svg .chart-title { font-size: 14px; font-weight: 600; }
        svg .axis-label { font-size: 12px; fill: var(--muted); }
        svg .tick-label, svg .support, svg .legend, svg .na { font-size: 11px; fill: var(--muted); }
        svg .panel-label { font-size: 12px; font-weight: 600; }
        svg .axis { stroke: var(--ink); stroke-width: 1; }
        svg .tick { stroke: var(--ink); }
        svg .grid { stroke: var(--line); stroke-width: 1; }
        svg .threshold { stroke: var(--ink); stroke-width: 1.5; stroke-dasharray: 6 4; }
        svg .threshold-label, svg .point-label, svg .guide-label { font-size: 11px; }
        svg .chance { stroke: var(--muted); stroke-dasharray: 4 4; }
        svg .guide { stroke: var(--muted); stroke-dasharray: 2 3; }
        svg .roc { fill: none; stroke-width: 2.5; }
        svg .line-solid, svg .line-dashed, svg .line-dotted { fill: none; stroke-width: 2.5; }
        svg .line-dashed { stroke-dasharray: 8 4; }
        svg .line-dotted { stroke-dasharray: 2 3; }
        svg .whisker { stroke: var(--ink); stroke-width: 1.2; }
        svg .empty-note { fill: var(--muted); }
        .two { display: grid; grid-template-columns: repeat(auto-fit, minmax(380px, 1fr)); gap: 24px; align-items: start; }
        .scroll { overflow-x: auto; }
        table.confusion { width: auto; font-size: 13px; }
        table.confusion th, table.confusion td { border: 1px solid var(--line); padding: 4px 8px; }
        table.confusion thead th { writing-mode: vertical-rl; transform: rotate(180deg); white-space: nowrap; vertical-align: bottom; text-align: left; padding: 8px 4px; }
        table.confusion thead th:first-child { writing-mode: horizontal-tb; transform: none; vertical-align: bottom; }
        td.zero { color: #b8bfc7; }
        td.ok { background: rgb(0 158 115 / calc(.10 + var(--share) * .45)); }
        td.danger { background: rgb(213 94 0 / calc(.6 + var(--share) * .4)); color: #fff; font-weight: 700; }
        td.refused { background: rgb(230 159 0 / calc(.12 + var(--share) * .45)); }
        td.total { font-weight: 600; }
        table.cases td { font-size: 14px; }
        .utt { white-space: pre-wrap; overflow-wrap: anywhere; }
        .mark { display: inline-block; padding: 0 4px; margin: 0 1px; border-radius: 3px; background: #eef0f3; color: var(--warn); font: 11px ui-monospace, Menlo, Consolas, monospace; }
        .none { color: var(--muted); }
        details { margin: 6px 0 20px; }
        summary { cursor: pointer; color: var(--accent); }
        footer { margin-top: 40px; padding-bottom: 40px; border-top: 1px solid var(--line); font-size: 14px; }
        dl.defs dt { font-weight: 600; margin-top: 8px; }
        dl.defs dd { margin: 0; color: var(--muted); }
        .caution { margin-top: 16px; padding: 8px 12px; background: #fff6e0; border-radius: 6px; }
        .visually-hidden { position: absolute; width: 1px; height: 1px; overflow: hidden; clip: rect(0 0 0 0); white-space: nowrap; }
        @media print { nav { display: none; } details { display: block; } h2 { break-after: avoid; } figure, table { break-inside: avoid; } }

        """;
}
