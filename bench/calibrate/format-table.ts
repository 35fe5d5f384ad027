/**
 * @module format-table
 * Prints cell summaries: an aligned text table for the terminal, the Markdown table of
 * docs/calibration.md (`--markdown`), or JSON (`--json`). Rates are shown as a percentage with
 * their counts (hits/total), so the binomial error is visible; bias and shrinkage in points of
 * share, bias with its standard error.
 */
import {
  type CellSummary,
  FLOOR,
  GOAL,
  pooledLeaderBySize,
  type Rate,
  rateOf,
  wilsonInterval,
} from "./summarize-cell.js";

const HEADER = [
  "regime",
  "decay",
  "n",
  "N/n",
  "ch",
  "coverage",
  "below/above",
  "leader inside",
  "leader 95% CI",
  "bias pts",
  "shrink pts",
  "false notes",
  "notes",
  "floor",
  "goal",
] as const;

function pct(rate: Rate): string {
  const p = rateOf(rate);
  if (p === null) return "—";
  return `${(100 * p).toFixed(0)}% (${rate.hits}/${rate.total})`;
}

/** The Wilson 95% interval of a rate in whole percent, e.g. "72–93%"; "—" when empty. */
function wilsonText(rate: Rate): string {
  const ci = wilsonInterval(rate);
  if (ci === null) return "—";
  return `${(100 * ci.low).toFixed(0)}–${(100 * ci.high).toFixed(0)}%`;
}

function signed(x: number, digits: number): string {
  const text = x.toFixed(digits);
  return x >= 0 && !text.startsWith("-") ? `+${text}` : text;
}

function cells(s: CellSummary): string[] {
  const misses = s.below + s.above;
  return [
    s.regime,
    s.decay,
    String(s.n),
    String(s.ratio),
    String(s.channels),
    pct(s.coverage),
    misses > 0 ? `${s.below}/${s.above}` : "0/0",
    s.leaderInside.total > 0 ? `${pct(s.leaderInside)} ${s.leaderBelow}/${s.leaderAbove}` : "—",
    wilsonText(s.leaderInside),
    s.bias === null
      ? "—"
      : `${signed(s.bias.points, 1)} ±${Number.isFinite(s.bias.se) ? s.bias.se.toFixed(1) : "?"}`,
    s.shrinkage === null ? "—" : signed(s.shrinkage, 1),
    pct(s.falseNotes),
    pct(s.notes),
    s.floor.met ? "PASS" : `MISSED: ${s.floor.missed.join(", ")}`,
    s.goal ? "yes" : "no",
  ];
}

/** One-line totals: how many cells meet the floor and reach the goal. */
export function totalsLine(summaries: readonly CellSummary[]): string {
  const floor = summaries.filter((s) => s.floor.met).length;
  const goal = summaries.filter((s) => s.goal).length;
  const misses = new Map<string, number>();
  for (const s of summaries) {
    for (const item of s.floor.missed) misses.set(item, (misses.get(item) ?? 0) + 1);
  }
  const order = ["coverage", "leader", "false notes", "notes", "bias"];
  const byItem = [...misses]
    .sort((a, b) => order.indexOf(a[0]) - order.indexOf(b[0]))
    .map(([item, count]) => `${item} ${count}`)
    .join(", ");
  return `calibrate: ${floor} of ${summaries.length} cells meet the floor, ${goal} reach the goal${byItem ? ` (cells missing: ${byItem})` : ""}`;
}

/**
 * One line per size and decay setting: the leader rate of all its leader cells pooled, with its
 * Wilson 95% interval and the misses below/above. Empty when no cell has leader channels.
 */
export function pooledLeaderLines(summaries: readonly CellSummary[]): string[] {
  const pooled = pooledLeaderBySize(summaries);
  if (pooled.length === 0) return [];
  return [
    `leader inside, pooled over N/n and the two leader regimes (floor ${100 * FLOOR.leaderInside}%, nominal 90%):`,
    ...pooled.map(
      (p) =>
        `  n = ${p.n}, ${p.decay}: ${pct(p.inside)}, 95% CI ${wilsonText(p.inside)}, misses ${p.below} below / ${p.above} above, ${p.cells} cells`,
    ),
  ];
}

export const LEGEND = [
  `coverage: member-intervals holding the true share (all members; the goal is ${100 * GOAL.low}–${100 * GOAL.high}%, the floor ${100 * FLOOR.coverage}%).`,
  "below/above: member-intervals lying wholly below / above the true share.",
  `leader inside: leader channels whose leader's interval holds the designed share (floor ${100 * FLOOR.leaderInside}%), then below/above.`,
  "leader 95% CI: Wilson's score interval of the leader rate (Wilson 1927, JASA 22:209–212): the verdict compares the measured rate with the floor; a cell whose interval holds 85% is within binomial noise of it either way.",
  `bias pts: mean reported leader share minus the truth, in points of share, ± its standard error (floor |bias| ≤ ${FLOOR.biasPoints} once N/n ≥ ${FLOOR.biasFromRatio}).`,
  "shrink pts: the model's point estimate at the expected counts (no noise, no decay) minus the truth: the prior's pull alone.",
  `false notes: channels whose true top ≤ line − 0.05 that got a note (floor < ${100 * FLOOR.falseNotes}%).`,
  `notes: channels whose true top ≥ line + 0.10 that got a note (floor ≥ ${100 * FLOOR.notes}%).`,
  "ch: channels in the cell; a rate with few counts has a wide binomial error (at 90%, ±4 points for 200 intervals, ±9 for 40 channels).",
];

export function textTable(summaries: readonly CellSummary[]): string {
  const rows = summaries.map(cells);
  const widths = HEADER.map((h, c) => Math.max(h.length, ...rows.map((r) => r[c].length)));
  const numeric = new Set([2, 3, 4]);
  const line = (parts: readonly string[]) =>
    parts
      .map((part, c) => (numeric.has(c) ? part.padStart(widths[c]) : part.padEnd(widths[c])))
      .join("  ")
      .trimEnd();
  return [
    line(HEADER),
    line(widths.map((w) => "-".repeat(w))),
    ...rows.map(line),
    "",
    ...LEGEND,
    "",
    totalsLine(summaries),
    ...pooledLeaderLines(summaries),
  ].join("\n");
}

export function markdownTable(summaries: readonly CellSummary[]): string {
  const row = (parts: readonly string[]) => `| ${parts.join(" | ")} |`;
  return [
    row(HEADER),
    row(HEADER.map(() => "---")),
    ...summaries.map((s) => row(cells(s))),
    "",
    totalsLine(summaries),
    "",
    ...pooledLeaderLines(summaries).map((line) => `${line.trim()}  `),
  ].join("\n");
}
