/**
 * @module digest-blocks
 * The weekly balance digest (DESIGN.md §1, §6) as a neutral message: the window, who and how much
 * was counted, effective voices, balance, the largest share with its interval, the change since the
 * previous digest, structure, labelled group shares, the share bars, a plain reading, the cautions
 * and a pointer to the how to read. With too little data it says how much more is needed.
 */

import type { BarRow, Block, FigureRow } from "../domain/blocks.js";
import type { AnalysisReport } from "../domain/report.js";
import type { OutgoingMessage } from "../ports/chat-platform.js";
import { CAUTIONS_LINE } from "./cautions.js";
import { shareBarsChart } from "./charts/share-bars-chart.js";
import { decimal1, isoDay, percent, percentRange, voicesOf } from "./format.js";
import { memberLabeller, type NamingPolicy } from "./naming.js";
import { plainReading } from "./reading.js";
import { renderText } from "./render-text.js";

/** The pointer every posted figure ends with. */
export const EXPLAIN_POINTER = "How to read these figures: /influence explain";

/** Bars shown in the text and in the chart image alike. */
const DIGEST_MAX_BARS = 15;

export interface DigestArgs {
  readonly report: AnalysisReport;
  /** The report of the previous digest's window, or null for the first digest. */
  readonly previous: AnalysisReport | null;
  /** Naming rules for the channel audience (usually `{ namesOn: settings.names }`). */
  readonly policy: NamingPolicy;
  /** The channel's display name for the heading; the channel id otherwise. */
  readonly channelName?: string;
}

/** "2026-11-02 to 2026-11-30 (28 days, half-life 14 days)". */
export function windowText(report: AnalysisReport): string {
  const w = report.window;
  const decay =
    w.halfLifeDays > 0
      ? `recent weeks count more, half-life ${w.halfLifeDays} days`
      : "every day counts the same";
  return `${isoDay(w.from)} to ${isoDay(w.until)} (${w.days} days; ${decay})`;
}

/** What an insufficient report lacks, in plain words with the numbers. */
export function neededText(report: AnalysisReport): string {
  const needed = report.needed ?? { members: 0, signals: 0 };
  const parts: string[] = [];
  if (needed.members > 0) {
    parts.push(
      `${needed.members} more opted-in member${needed.members === 1 ? "" : "s"} taking part`,
    );
  }
  if (needed.signals > 0) {
    parts.push(
      `${needed.signals} more ${needed.signals === 1 ? "reply or mention" : "replies or mentions"} between opted-in members`,
    );
  }
  const have = `${report.members} active opted-in member${report.members === 1 ? "" : "s"} and ${report.signals} signal${report.signals === 1 ? "" : "s"} (replies and mentions) in the window`;
  return `Not enough opted-in activity for figures yet: ${have}. Figures need ${parts.join(" and ")}. Anyone can opt in with /influence join.`;
}

/** Closed groups and the speed of settling, in plain words. */
export function structureText(report: AnalysisReport): string {
  const c = report.consensus;
  if (!c) return "not known";
  if (c.closedGroups > 1) {
    return `${c.closedGroups} groups listen only among themselves, so there is no single pooled view`;
  }
  if (!c.reached) return "views keep circling and do not settle";
  // No rounds-to-halve in chat (DESIGN.md §4.8): the speed depends on an unmeasured self-weight.
  return "one closed group: views settle on one consensus";
}

function signed(x: number, digits: number): string {
  const text = Math.abs(x).toFixed(digits);
  if (Number(text) === 0) return `±${text}`;
  return `${x > 0 ? "+" : "−"}${text}`;
}

/** The change since the previous digest, or why there is none. */
export function changeRow(report: AnalysisReport, previous: AnalysisReport | null): FigureRow {
  if (previous === null) {
    return { label: "Since last digest", value: "first digest: nothing to compare with yet" };
  }
  const label = `Since ${isoDay(previous.window.until)}`;
  if (!previous.effectiveVoices || !previous.top || !report.effectiveVoices || !report.top) {
    return { label, value: "no comparison: that week had too little data for figures" };
  }
  const ev = report.effectiveVoices.value - previous.effectiveVoices.value;
  const top = (report.top.share - previous.top.share) * 100;
  const points = Math.round(top);
  return {
    label,
    value: `effective voices ${signed(ev, 1)} (${decimal1(previous.effectiveVoices.value)} → ${decimal1(report.effectiveVoices.value)}); largest share ${signed(top, 0)} point${Math.abs(points) === 1 ? "" : "s"} (${percent(previous.top.share)} → ${percent(report.top.share)})`,
  };
}

/** Share bars for a report with figures, labelled by the naming policy. */
export function shareBars(
  report: AnalysisReport,
  policy: NamingPolicy,
  maxBars = DIGEST_MAX_BARS,
): Block | null {
  if (!report.influence || report.influence.length === 0) return null;
  const label = memberLabeller(report.influence, policy);
  const rows: BarRow[] = report.influence.slice(0, maxBars).map((e) => ({
    label: label(e.member),
    value: e.share,
    low: e.low,
    high: e.high,
    text: `${percent(e.share)} (${percentRange(e.low, e.high)})`,
  }));
  const more = report.influence.length - rows.length;
  return {
    kind: "bars",
    caption: `Influence shares, largest first (${Math.round(report.settings.interval * 100)}% interval in brackets${more > 0 ? `; ${more} more not shown` : ""})`,
    rows,
    line: report.line?.threshold ?? null,
  };
}

function figureRows(args: DigestArgs): FigureRow[] {
  const { report, previous, policy } = args;
  const rows: FigureRow[] = [
    { label: "Active members", value: `${report.members}`, detail: `${report.signals} signals` },
  ];
  const ev = report.effectiveVoices;
  const top = report.top;
  if (ev && top && report.influence) {
    const label = memberLabeller(report.influence, policy);
    rows.push(
      {
        label: "Effective voices",
        value: voicesOf(ev.value, report.members),
        detail: `interval ${decimal1(ev.low)}–${decimal1(ev.high)}`,
      },
      {
        label: "Balance",
        value: (report.balance ?? 0).toFixed(2),
        detail: "1.00 = perfectly even",
      },
      {
        label: "Largest share",
        value: `${percent(top.share)}, interval ${percentRange(top.low, top.high)}`,
        detail: label(top.member),
      },
    );
    if (report.line) {
      rows.push({
        label: "Line",
        value: percent(report.line.threshold),
        detail: report.line.crossed
          ? `crossed: one member is above it with probability ${percent(report.line.probability)}`
          : "not crossed",
      });
    }
    rows.push(changeRow(report, previous));
  }
  rows.push({ label: "Structure", value: structureText(report) });
  return rows;
}

/** The digest as neutral blocks. */
export function digestBlocks(args: DigestArgs): Block[] {
  const { report } = args;
  const blocks: Block[] = [
    { kind: "heading", text: `Balance digest · ${args.channelName ?? report.channel}` },
    { kind: "note", text: windowText(report) },
  ];
  if (report.status === "insufficient") {
    blocks.push({ kind: "note", text: neededText(report) });
  } else {
    blocks.push({ kind: "note", text: plainReading(report) });
    blocks.push({ kind: "figures", rows: figureRows(args) });
    if (report.groups && report.groups.length > 0) {
      blocks.push({
        kind: "figures",
        rows: [
          { label: "Groups", value: "share of influence", detail: "share of members" },
          ...report.groups.map((g) => ({
            label: `  ${g.group}`,
            value: `${percent(g.share)}, interval ${percentRange(g.low, g.high)}`,
            detail: `${percent(g.headcountShare)} of members (${g.members})`,
          })),
        ],
      });
    }
    const bars = shareBars(report, args.policy);
    if (bars) blocks.push(bars);
  }
  blocks.push({ kind: "cautions", text: CAUTIONS_LINE });
  blocks.push({ kind: "footer", text: EXPLAIN_POINTER });
  return blocks;
}

/** Alternative text of the digest's chart image. */
export function chartAltText(report: AnalysisReport): string {
  const interval = Math.round(report.settings.interval * 100);
  return `Influence shares, largest first, with ${interval}% intervals${report.line ? ` and the line at ${percent(report.line.threshold)}` : ""}`;
}

/**
 * The balance digest, ready to post: blocks plus their plain-text rendering, and the share bars as
 * a chart (the same SVG as the report page, labelled under the same naming policy as the text, so
 * the image names nobody the text does not) when the report has figures.
 */
export function digestMessage(args: DigestArgs): OutgoingMessage {
  const blocks = digestBlocks(args);
  const text = renderText(blocks);
  if (args.report.status === "insufficient") return { blocks, text };
  const svg = shareBarsChart(args.report, args.policy, { maxBars: DIGEST_MAX_BARS });
  if (svg === null) return { blocks, text };
  return { blocks, text, chart: { svg, alt: chartAltText(args.report) } };
}
