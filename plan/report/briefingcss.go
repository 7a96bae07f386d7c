package report

// briefingCSS styles the briefing on screen and in print. Page margins of
// 16 mm at the sides and 14/16 mm top and bottom leave 178 × 249 mm on US
// Letter (215.9 × 279.4 mm) and 178 × 267 mm on A4 (210 × 297 mm), so one
// layout fits both. Text is near-black on white (contrast over 15:1, WCAG
// 2.1 AA asks 4.5:1); the muted grey #4d4d4d is 8.5:1 and the accent blue
// #2b5d88 6.6:1. Local fonts only: nothing is fetched.
const briefingCSS = `@page { margin: 14mm 16mm 16mm 16mm; }
:root {
  --ink: #111111; --muted: #4d4d4d; --rule: #c9c9c9; --faint: #f2f2f0;
  --accent: #2b5d88; --ok: #1e6b34; --weak: #8a5300; --fail: #a1161d;
}
* { box-sizing: border-box; }
html { background: #ffffff; }
body {
  margin: 0 auto; padding: 24px 28px 40px; max-width: 210mm;
  color: var(--ink); background: #ffffff;
  font-family: "Source Sans 3", "Source Sans Pro", "Noto Sans", "DejaVu Sans", "Helvetica Neue", Arial, sans-serif;
  font-size: 10.5pt; line-height: 1.38;
}
h1, h2, h3 { line-height: 1.2; margin: 0; font-weight: 650; }
h1 { font-size: 22pt; letter-spacing: -0.01em; margin: 2px 0 4px; }
h2 {
  font-size: 13pt; margin: 18px 0 6px; padding-bottom: 3px;
  border-bottom: 1.5px solid var(--accent); color: var(--ink);
  break-after: avoid; page-break-after: avoid;
}
h3 { font-size: 11pt; margin: 12px 0 4px; break-after: avoid; page-break-after: avoid; }
h3 .site { font-weight: 400; color: var(--muted); }
p { margin: 0 0 6px; }
a { color: var(--accent); }
.masthead { border-bottom: 3px solid var(--ink); padding-bottom: 8px; margin-bottom: 6px; }
.kicker { text-transform: uppercase; letter-spacing: 0.12em; font-size: 8.5pt; color: var(--muted); margin: 0; }
.when { font-size: 11pt; margin: 0; }
.see-cautions { font-size: 9.5pt; color: var(--muted); margin: 4px 0 0; }
.lead { color: var(--muted); break-after: avoid; page-break-after: avoid; }
.small { font-size: 8.5pt; color: var(--muted); }
.summary { font-weight: 600; padding: 4px 8px; border-left: 4px solid var(--ok); }
.summary.short { border-left-color: var(--fail); }
figure { margin: 6px 0 10px; break-inside: avoid; page-break-inside: avoid; }
figcaption { font-size: 8.5pt; color: var(--muted); margin-top: 3px; }
.map img { display: block; width: auto; height: auto; max-width: 100%; max-height: 130mm; margin: 0 auto; border: 1px solid var(--rule); }
.map figcaption { text-align: center; }
svg.chart { display: block; width: 100%; height: auto; }
.sweep svg.chart { max-width: 140mm; max-height: 62mm; }
.profile svg.chart { max-height: 56mm; }
table.links tbody th { width: 27%; }
table.links td.way { width: 22%; }
table { width: 100%; border-collapse: collapse; margin: 2px 0 8px; font-size: 9pt; break-inside: avoid; page-break-inside: avoid; }
caption { text-align: left; font-size: 8.5pt; color: var(--muted); padding-bottom: 2px; caption-side: top; }
th, td { padding: 3px 6px; border-bottom: 1px solid var(--rule); vertical-align: top; text-align: left; }
thead th { border-bottom: 1.5px solid var(--ink); font-weight: 650; font-size: 8.5pt; white-space: nowrap; }
tbody th { font-weight: 600; }
tr { break-inside: avoid; page-break-inside: avoid; }
td.num { text-align: right; font-variant-numeric: tabular-nums; white-space: nowrap; }
td.keep { font-weight: 700; }
td.assume { font-size: 8.5pt; }
.verdict { font-weight: 600; white-space: nowrap; }
.verdict.ok { color: var(--ok); }
.verdict.weak { color: var(--weak); }
.verdict.fail { color: var(--fail); }
.verdict.ok::before { content: "\2713\00a0"; }
.verdict.weak::before { content: "!\00a0"; }
.verdict.fail::before { content: "\2717\00a0"; }
.keep, #requirement, #mast, #exposure, #inputs, .station, .route { break-inside: avoid; page-break-inside: avoid; }
.choice { padding: 6px 10px; border: 1px solid var(--rule); border-left: 4px solid var(--ok); }
.choice.short { border-left-color: var(--fail); }
.cautions {
  margin: 16px 0 10px; padding: 8px 14px 6px; border: 2.5px solid var(--ink); border-radius: 3px;
  break-inside: avoid; page-break-inside: avoid;
}
.cautions h2 { border: 0; margin: 0 0 4px; font-size: 13pt; text-transform: uppercase; letter-spacing: 0.08em; }
.cautions h2::before { content: "\26A0\00a0"; }
.cautions ul { margin: 0; padding-left: 18px; }
.cautions li { margin-bottom: 3px; }
dl.inputs { display: grid; grid-template-columns: max-content 1fr; gap: 2px 14px; margin: 4px 0 8px; font-size: 9pt; }
dl.inputs dt { font-weight: 600; }
dl.inputs dd { margin: 0; }
footer { margin-top: 18px; padding-top: 6px; border-top: 1px solid var(--rule); font-size: 8pt; color: var(--muted); }
@media print {
  body { padding: 0; max-width: none; font-size: 9.5pt; }
  a { color: inherit; text-decoration: none; }
  .map img { print-color-adjust: exact; -webkit-print-color-adjust: exact; }
}
`
