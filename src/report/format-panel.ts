/**
 * @module format-panel
 * Meeting formats on the report page (DESIGN.md §1 format): the format periods as bands on the
 * weekly charts, the format in force in each week's table row, and the format comparison panel —
 * each format's balance, effective voices and largest share with their ranges, how sure the
 * difference is, the time warning, and the periods left out and why (the same sentences as the
 * chat's `compare formats`).
 */
import type { FormatsReport } from "../analysis/compare-formats.js";
import type { PeriodBand } from "./charts/band-line-chart.js";
import { blocksHtml, keepDatesWhole } from "./charts/blocks-html.js";
import { escapeXml } from "./charts/svg.js";
import { decimal1, isoDay, percent, percentRange } from "./format.js";
import { formatsBlocks } from "./format-blocks.js";

const WEEK_MS = 7 * 86_400_000;
const COLUMNS = ["balance", "effective voices", "largest share", "periods counted", "days"];

function html(text: string): string {
  return keepDatesWhole(escapeXml(text));
}

/** The format periods as bands over week ends `ends` (ascending, 7 days apart). */
export function formatBands(
  formats: FormatsReport | null | undefined,
  ends: readonly number[],
): PeriodBand[] {
  if (!formats || ends.length < 2) return [];
  const styles = new Map(formats.formats.map((f, k) => [f.format, k]));
  const first = ends[0];
  const last = ends.length - 1;
  return formats.periods.flatMap((p) => {
    const from = (Date.parse(p.start) - first) / WEEK_MS;
    const to = (Date.parse(p.end) - first) / WEEK_MS;
    if (to <= 0 || from >= last) return [];
    return [{ from, to, label: p.format, style: styles.get(p.format) ?? 0 }];
  });
}

/** The formats that ran in the week ending at `until`, in order ("none" when none). */
export function formatsInWeek(formats: FormatsReport | null | undefined, until: number): string {
  if (!formats) return "none";
  const names = formats.periods
    .filter((p) => Date.parse(p.start) < until && Date.parse(p.end) > until - WEEK_MS)
    .map((p) => p.format);
  const unique = names.filter((n, k) => names.indexOf(n) === k);
  return unique.length === 0 ? "none" : unique.join(", then ");
}

function range(
  f: { value: number; low: number; high: number } | null,
  write: (x: number) => string,
) {
  return f === null ? "no figure" : `${write(f.value)} (${write(f.low)}–${write(f.high)})`;
}

/** The panel: the formats table, the sentences of `compare formats`, and the periods. */
export function formatsSection(report: FormatsReport): string {
  const rows = report.formats.map((f) => {
    const cells = [
      f.balance ? range(f.balance, (x) => x.toFixed(2)) : "no figure",
      range(f.effectiveVoices, decimal1),
      f.topShare
        ? `${percent(f.topShare.value)} (${percentRange(f.topShare.low, f.topShare.high)})`
        : "no figure",
      `${f.periods} of ${report.periods.filter((p) => p.format === f.format).length}`,
      String(Math.round(f.days)),
    ];
    return `<tr><th scope="row">${html(f.format)}</th>${cells.map((c, k) => `<td data-label="${COLUMNS[k]}">${html(c)}</td>`).join("")}</tr>`;
  });
  const interval = Math.round(report.interval * 100);
  const head = ["format", ...COLUMNS].map((c) => `<th scope="col">${c}</th>`).join("");
  const table = `<table class="formats"><caption>Each format's figures, the mean of its periods (${interval}% range in brackets)</caption><thead><tr>${head}</tr></thead><tbody>${rows.join("")}</tbody></table>`;
  const notes = formatsBlocks(report).filter((b) => b.kind === "note");
  const periods = report.periods.map((p) => {
    const until = p.open ? "now" : isoDay(p.end);
    const counted = p.leftOut === null ? "counted" : `left out: ${p.leftOut}`;
    // A period too short for figures is not read at all: its counts are unknown, not zero.
    const short = p.leftOut === "too short";
    const members = short ? "–" : String(p.members);
    const signals = short ? "–" : String(p.signals);
    return `<tr><th scope="row">${html(p.format)}</th><td>${html(`${isoDay(p.start)}..${until}`)}</td><td>${members}</td><td>${signals}</td><td>${html(counted)}</td></tr>`;
  });
  const periodTable = `<details class="chart-table"><summary>Table: every format period</summary><div class="scroll-x" tabindex="0" role="region" aria-label="every format period"><table><thead><tr><th scope="col">format</th><th scope="col">dates</th><th scope="col">active members</th><th scope="col">replies and mentions</th><th scope="col">in the comparison</th></tr></thead><tbody>${periods.join("")}</tbody></table></div></details>`;
  return [
    `<section id="formats"><h2>Meeting formats</h2>`,
    `<p class="detail">Each format period is read on its own, from the replies and mentions inside it; a format's figures are the mean of its periods, so one busy period does not decide. The bands on the week-by-week charts show when each format ran.</p>`,
    report.formats.length > 0 ? table : "",
    blocksHtml(notes),
    report.periods.length > 0 ? periodTable : "",
    "</section>",
  ].join("\n");
}
