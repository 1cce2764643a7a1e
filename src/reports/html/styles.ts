/**
 * The report's one inline style sheet: plain type, ruled tables with
 * tabular figures, and a print layout (A4, a page break before every
 * facility and before the methods, tables and charts kept whole where they
 * fit). No web fonts, no images: the document needs nothing from outside.
 */
export const REPORT_CSS = `
:root {
  --ink: #0f172a;
  --muted: #475569;
  --rule: #cbd5e1;
  --pale: #f1f5f9;
  --accent: #0f4c5c;
  --good: #0f766e;
  --bad: #9f1239;
  --warn: #b45309;
  --warn-pale: #fffbeb;
}
* { box-sizing: border-box; }
html { color: var(--ink); background: #fff; font: 10.5pt/1.45 system-ui, -apple-system, "Segoe UI", Helvetica, Arial, sans-serif; }
body { margin: 0 auto; max-width: 1040px; padding: 28px 36px 56px; }
h1 { font-size: 20pt; line-height: 1.2; margin: 0 0 2px; }
h2 { font-size: 14.5pt; margin: 34px 0 10px; padding-bottom: 4px; border-bottom: 2px solid var(--accent); }
h3 { font-size: 12pt; margin: 22px 0 8px; }
h4 { font-size: 9.5pt; margin: 16px 0 6px; color: var(--muted); text-transform: uppercase; letter-spacing: 0.05em; }
p { margin: 6px 0; }
.lead { font-size: 12pt; color: var(--muted); margin: 0 0 14px; }
.note { color: var(--muted); font-size: 9pt; }
code { font: 8.5pt/1.3 ui-monospace, "SFMono-Regular", Menlo, Consolas, monospace; }
code.hash, dd code, p code { overflow-wrap: anywhere; }
table { width: 100%; border-collapse: collapse; margin: 6px 0 14px; font-size: 9.5pt; font-variant-numeric: tabular-nums; }
caption { caption-side: top; text-align: left; font-weight: 600; padding: 0 0 4px; }
th, td { padding: 3px 7px; text-align: left; vertical-align: top; border-bottom: 1px solid var(--rule); }
thead th { background: var(--pale); border-bottom: 1.5px solid var(--ink); font-weight: 600; vertical-align: bottom; }
tbody th { font-weight: 500; }
.num { text-align: right; white-space: nowrap; }
.stated-uncertainty { display: block; }
thead th.num { white-space: normal; }
td.date { white-space: nowrap; }
table.periods { font-size: 9pt; }
table.periods th, table.periods td { padding: 3px 5px; }
tfoot td, tfoot th { border-top: 1.5px solid var(--ink); border-bottom: none; font-weight: 600; }
table.summary { width: auto; min-width: 55%; }
table.compact { width: auto; }
table.compact th, table.compact td { padding-right: 18px; }
table.summary tbody th { padding-right: 28px; }
tr.outside td { background: #f6f8fb; }
.outside-mark { color: var(--muted); font-size: 8pt; }
td.range { text-align: center; }
.verdict-surplus { color: var(--good); font-weight: 600; }
.verdict-shortfall { color: var(--bad); font-weight: 600; }
.verdict-band { color: var(--muted); }
dl.facts { display: grid; grid-template-columns: max-content 1fr; gap: 3px 18px; margin: 8px 0 12px; }
dl.facts dt { color: var(--muted); }
dl.facts dd { margin: 0; }
.caution { margin: 16px 0; padding: 10px 14px; border: 1.5px solid var(--warn); border-left-width: 6px; background: var(--warn-pale); font-weight: 500; }
.caution strong { display: block; color: var(--warn); text-transform: uppercase; letter-spacing: 0.05em; font-size: 9pt; margin-bottom: 2px; }
.missing { margin: 8px 0; padding: 8px 12px; border-left: 4px solid var(--muted); background: var(--pale); }
nav.contents ol { margin: 4px 0 0; padding-left: 20px; }
nav.contents a { color: var(--accent); }
section.facility { margin-top: 44px; }
section.facility > h2 { font-size: 16pt; }
article.meter { margin-top: 26px; padding-top: 4px; border-top: 1px solid var(--rule); }
article.meter > h3 { font-size: 13pt; }
figure.chart { margin: 12px 0 18px; }
figure.chart svg { display: block; width: 100%; max-width: 760px; height: auto; border: 1px solid var(--rule); }
figure.chart figcaption { font-size: 9pt; color: var(--muted); margin-top: 4px; max-width: 760px; }
ul.plain { margin: 4px 0 10px; padding-left: 20px; }
.adjustment-reason { white-space: pre-wrap; }
footer.closing { margin-top: 40px; }
@page { size: A4; margin: 14mm 12mm 16mm; }
@media print {
  html { font-size: 9.5pt; }
  body { max-width: none; padding: 0; }
  section.facility { margin-top: 0; break-before: page; page-break-before: always; }
  section.methods { break-before: page; page-break-before: always; }
  h2, h3, h4 { break-after: avoid; page-break-after: avoid; }
  figure.chart, .caution, dl.facts, table.summary, .missing { break-inside: avoid; page-break-inside: avoid; }
  figure.chart svg { max-width: 165mm; }
  tr { break-inside: avoid; page-break-inside: avoid; }
  thead { display: table-header-group; }
  nav.contents a { color: inherit; text-decoration: none; }
  table { font-size: 8.5pt; }
  table.periods { font-size: 7.5pt; }
  th, td { padding: 2px 5px; }
  table.periods th, table.periods td { padding: 2px 3px; }
}
`;
