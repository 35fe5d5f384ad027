/**
 * @module page-style
 * The report page's only stylesheet, inlined into the page: system fonts, a single readable
 * column that widens to a chart grid on large screens, charts drawn at their own width at most (so
 * a lone chart never stretches and its text never grows) and scaled down to phone width through
 * their `viewBox`; on narrow screens the attention map gives way to its ranked list. Text colours
 * pass WCAG 2.2 AA contrast on their backgrounds (checked in test/charts/contrast.test.ts), and a
 * print layout keeps each chart on one page.
 */

export const PAGE_STYLE = `
:root { color-scheme: light; --ink: #1a1a1a; --muted: #555555; --rule: #d6d6d6; --accent: #0072B2; --warn: #D55E00; }
* { box-sizing: border-box; }
html { -webkit-text-size-adjust: 100%; text-size-adjust: 100%; }
body { margin: 0 auto; max-width: 1040px; padding: 16px; color: var(--ink); background: #ffffff;
  font: 16px/1.5 system-ui, -apple-system, "Segoe UI", Roboto, "DejaVu Sans", Arial, sans-serif; }
header { border-bottom: 3px solid var(--accent); margin-bottom: 16px; }
h1 { font-size: 1.6rem; margin: 0 0 4px; line-height: 1.25; }
h2 { font-size: 1.3rem; margin: 28px 0 8px; border-bottom: 1px solid var(--rule); padding-bottom: 4px; }
h3 { font-size: 1.1rem; margin: 20px 0 6px; }
p { margin: 0 0 10px; max-width: 70ch; }
.meta { color: var(--muted); font-size: 0.95rem; }
.caution { border-left: 4px solid var(--warn); padding: 8px 12px; background: #fdf3ec; max-width: 70ch; }
.audience { border-left: 4px solid var(--accent); padding: 8px 12px; background: #eef5fb; max-width: 70ch; }
.footer { color: var(--muted); font-size: 0.9rem; }
table.figures { border-collapse: collapse; margin: 8px 0 16px; width: 100%; max-width: 760px; }
table.figures th, table.figures td { text-align: left; vertical-align: top; padding: 6px 8px; border-bottom: 1px solid var(--rule); }
table.figures th { font-weight: 600; width: 30%; min-width: 7em; }
.detail { color: var(--muted); }
table.formats { border-collapse: collapse; margin: 8px 0 16px; max-width: 860px; }
table.formats caption { text-align: left; color: var(--muted); padding-bottom: 4px; }
table.formats th, table.formats td { text-align: left; vertical-align: top; padding: 6px 10px 6px 0; border-bottom: 1px solid var(--rule); }
table.formats thead th { font-weight: 600; }
.scroll-x { overflow-x: auto; max-width: 100%; }
.charts { display: grid; grid-template-columns: repeat(auto-fit, minmax(min(100%, 460px), 1fr)); gap: 24px; align-items: start; }
figure { margin: 0 0 16px; }
figure svg { display: block; max-width: 100%; height: auto; }
figcaption { color: var(--muted); font-size: 0.9rem; margin-top: 4px; max-width: 460px; }
.nowrap { white-space: nowrap; }
details.chart-table { margin-top: 6px; max-width: 600px; }
details.chart-table summary { cursor: pointer; color: var(--accent); font-size: 0.95rem; }
details.chart-table table { border-collapse: collapse; margin-top: 6px; font-size: 0.9rem; }
details.chart-table th, details.chart-table td { text-align: left; padding: 3px 10px 3px 0; border-bottom: 1px solid var(--rule); }
.map-list { display: none; }
.map-list ol { padding-left: 2.4em; margin: 6px 0; }
.map-list li { margin-bottom: 6px; }
@media (max-width: 520px) {
  figure.wide { display: none; }
  .map-list { display: block; }
}
@media (max-width: 480px) {
  body { padding: 10px; font-size: 15px; }
  h1 { font-size: 1.35rem; }
  table.figures th { width: auto; }
  table.figures th, table.figures td { display: block; padding: 2px 0; border: 0; }
  table.figures tr { display: block; padding: 6px 0; border-bottom: 1px solid var(--rule); }
  table.formats thead { display: none; }
  table.formats th, table.formats td { display: block; padding: 2px 0; border: 0; }
  table.formats td::before { content: attr(data-label) ": "; color: var(--muted); }
  table.formats tr { display: block; padding: 6px 0; border-bottom: 1px solid var(--rule); }
}
@media print {
  body { max-width: none; padding: 0; font-size: 11pt; }
  header { border-bottom-width: 2px; }
  .charts { display: block; }
  figure, table.figures, .caution, .audience { break-inside: avoid; page-break-inside: avoid; margin-bottom: 12pt; }
  figure svg { max-width: 16cm; }
  h2 { break-after: avoid; page-break-after: avoid; }
  * { -webkit-print-color-adjust: exact; print-color-adjust: exact; }
}
`;
