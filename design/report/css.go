package report

// css is the page's only style sheet. It uses locally installed fonts only,
// fixes the figure widths so the layout is known, and has a print variant
// that drops the backgrounds; tables mark pass and fail in words, and the
// figures tell series apart by dash pattern and marker as well as colour.
const css = `:root {
  --ink: #1e2a32; --muted: #5d6972; --rule: #d3d9de; --soft: #f3f5f6;
  --accent: #24506e; --accent-soft: #e8eff5; --pass: #1d6a38; --fail: #a11d1d;
  --warn: #8a5a00; --warn-soft: #fff7e3;
}
* { box-sizing: border-box; }
html { background: #e9ecee; }
body {
  margin: 0; padding: 28px 0 40px; color: var(--ink);
  font: 15px/1.5 "Liberation Sans", Arimo, Arial, Helvetica, "DejaVu Sans", sans-serif;
}
.page {
  width: 1024px; margin: 0 auto; padding: 30px 32px 24px; background: #fff;
  box-shadow: 0 1px 4px rgba(0, 0, 0, 0.18);
}
header.top { border-top: 6px solid var(--accent); padding-top: 16px; }
.kicker {
  margin: 0; font-size: 12px; letter-spacing: 0.12em; text-transform: uppercase;
  color: var(--muted);
}
h1 { margin: 4px 0 2px; font-size: 28px; line-height: 1.2; }
.subtitle { margin: 0 0 10px; color: var(--muted); font-size: 16px; }
dl.facts { display: flex; flex-wrap: wrap; gap: 6px 28px; margin: 10px 0 0; }
dl.facts div { display: flex; gap: 8px; }
dl.facts dt { color: var(--muted); }
dl.facts dt::after { content: ":"; }
dl.facts dd { margin: 0; font-weight: bold; }
.notice {
  margin: 14px 0 0; padding: 8px 12px; border: 2px dashed var(--warn);
  background: var(--warn-soft); font-weight: bold;
}
.safety { margin: 10px 0 0; padding-left: 10px; border-left: 4px solid var(--warn); font-size: 14px; }
nav.toc { margin-top: 14px; border-top: 1px solid var(--rule); padding-top: 8px; font-size: 13px; }
nav.toc ol { margin: 0; padding: 0; list-style: none; display: flex; flex-wrap: wrap; gap: 4px 16px; counter-reset: toc; }
nav.toc li { counter-increment: toc; }
nav.toc li::before { content: counter(toc) " "; color: var(--muted); }
nav.toc a { color: var(--accent); text-decoration: none; }
section { margin-top: 30px; }
h2 {
  margin: 0 0 10px; padding-bottom: 5px; font-size: 19px;
  border-bottom: 1px solid var(--rule);
}
h2 .num {
  display: inline-block; min-width: 26px; margin-right: 8px; color: var(--muted);
  font-weight: normal;
}
section.headline {
  margin-top: 24px; padding: 16px 20px 10px; border: 2px solid var(--accent);
  background: var(--accent-soft);
}
section.headline h2 { border-bottom-color: var(--accent); }
.lead { margin: 0 0 12px; }
.note { margin: 8px 0 0; font-size: 13px; color: var(--muted); }
.missing { font-style: italic; color: var(--muted); }
.cards { display: flex; flex-wrap: wrap; gap: 14px; margin-bottom: 14px; }
.card {
  flex: 1 1 200px; padding: 10px 14px; background: #fff;
  border: 1px solid var(--rule); border-left: 5px solid var(--accent);
}
.card p { margin: 0; }
.card .axis { font-weight: bold; }
.card .big { font-size: 38px; line-height: 1.1; font-weight: bold; color: var(--accent); }
.card .word { font-size: 14px; }
.card .detail { font-size: 13px; color: var(--muted); margin-top: 4px; }
table { width: 100%; border-collapse: collapse; font-size: 14px; background: #fff; }
th, td { padding: 6px 10px; text-align: left; vertical-align: top; border-bottom: 1px solid var(--rule); }
thead th { border-bottom: 2px solid var(--ink); font-size: 13px; }
th.num, td.num { text-align: right; white-space: nowrap; font-variant-numeric: tabular-nums; }
td.strong { font-weight: bold; }
table.kv th[scope=row] { width: 220px; font-weight: normal; color: var(--muted); }
tr.total td { font-weight: bold; border-top: 2px solid var(--ink); }
tr.failed td { background: #fbeaea; }
.pass { color: var(--pass); font-weight: bold; }
.fail { color: var(--fail); font-weight: bold; }
th.barcol, td.barcol { width: 170px; }
.bar {
  display: inline-block; height: 11px; vertical-align: middle;
  background: #8fa9bf; border: 1px solid var(--accent);
}
sup { font-size: 72%; line-height: 0; vertical-align: 0.45em; }
a { color: var(--accent); }
code { font: 13px/1.4 "Liberation Mono", "DejaVu Sans Mono", monospace; word-break: break-all; }
figure.fig { margin: 0; }
figure.fig svg.plot { display: block; width: 100%; height: auto; }
figure.fig svg.plot image { image-rendering: pixelated; }
figcaption { margin-top: 6px; font-size: 13px; color: var(--muted); }
.cautions {
  padding: 4px 18px; border: 2px solid var(--warn); border-left-width: 8px;
  background: var(--warn-soft);
}
.cautions p { margin: 10px 0; }
footer { margin-top: 30px; padding-top: 8px; border-top: 1px solid var(--rule); font-size: 12px; color: var(--muted); }
footer p { margin: 0; }
@media print {
  @page { size: A4; margin: 14mm 12mm; }
  html, body { background: #fff; padding: 0; }
  body { font-size: 10.5pt; }
  .page { width: auto; padding: 0; box-shadow: none; }
  .safety { margin: 10px 0 0; padding-left: 10px; border-left: 4px solid var(--warn); font-size: 14px; }
nav.toc { display: none; }
  section.headline, .card, table, .notice, .cautions { background: #fff; }
  section, figure, table, .cards { break-inside: avoid; }
  h2 { break-after: avoid; }
  a { color: inherit; text-decoration: none; }
  tr.failed td { background: #fff; }
  .bar { background: #fff; border: 1px solid #000; }
}
`
