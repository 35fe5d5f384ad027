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
import { disclose, hiddenGroupRows } from "./disclosure.js";
import {
  changeText,
  decimal1,
  isoDay,
  percent,
  percentRange,
  probability,
  voicesOf,
} from "./format.js";
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
  /** Lines about meeting formats: the current one and how it compares, a trial's result. */
  readonly formatLines?: readonly string[];
}

/** "Replies and mentions from 2026-11-02 to 2026-11-30 (28 days; one 14 days old counts half …)". */
export function windowText(report: AnalysisReport): string {
  const w = report.window;
  const decay =
    w.halfLifeDays > 0
      ? `one ${w.halfLifeDays} days old counts half as much as one from today`
      : "every day counts the same";
  return `Replies and mentions from ${isoDay(w.from)} to ${isoDay(w.until)} (${w.days} days; ${decay}).`;
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
  const have = `${report.members} active opted-in member${report.members === 1 ? "" : "s"} and ${report.signals} ${report.signals === 1 ? "reply or mention" : "replies or mentions"} between them in these ${report.window.days} days`;
  return `Not enough opted-in activity for figures yet: ${have}. Figures need ${parts.join(" and ")}. Anyone can opt in with /influence join.`;
}

/** Whether everyone is in one conversation, in plain words. */
export function structureText(report: AnalysisReport): string {
  const c = report.consensus;
  if (!c) return "not known";
  if (c.closedGroups > 1) {
    return `${c.closedGroups} groups only answer among themselves${report.status === "ok" ? "" : ", so there is no single shared view"}`;
  }
  if (!c.reached) return "views keep going round without coming together";
  return "everyone is connected in one conversation";
}

/** The change since the previous digest, or why there is none, from the printed figures. */
export function changeRow(report: AnalysisReport, previous: AnalysisReport | null): FigureRow {
  if (previous === null) {
    return { label: "Since last digest", value: "first digest: nothing to compare with yet" };
  }
  const label = `Since ${isoDay(previous.window.until)}`;
  if (!previous.effectiveVoices || !previous.top || !report.effectiveVoices || !report.top) {
    return { label, value: "no comparison: that week had too little data for figures" };
  }
  const voices = changeText(
    "effective voices",
    decimal1(previous.effectiveVoices.value),
    decimal1(report.effectiveVoices.value),
    1,
  );
  const top = changeText(
    "largest share",
    percent(previous.top.share),
    percent(report.top.share),
    0,
    "point",
  );
  return { label, value: `${voices}; ${top}` };
}

/** The one line saying what "member 3" means, when a message shows such a label. */
export const RANK_LABELS =
  '"member 3" means the member with the 3rd largest share in these figures; it is a place in the ranking, not a name';

/** Share bars for a report with figures, labelled by the naming policy. */
export function shareBars(
  report: AnalysisReport,
  policy: NamingPolicy,
  maxBars = DIGEST_MAX_BARS,
  explainRanks = true,
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
  const ranked = explainRanks && rows.some((r) => /^member \d+$/.test(r.label));
  return {
    kind: "bars",
    caption: `Influence shares, largest first (${Math.round(report.settings.interval * 100)}% interval in brackets${more > 0 ? `; ${more} more not shown` : ""})${ranked ? `. ${RANK_LABELS}.` : ""}`,
    rows,
    line: report.line?.threshold ?? null,
  };
}

function figureRows(args: DigestArgs): FigureRow[] {
  const { report, previous, policy } = args;
  const rows: FigureRow[] = [
    {
      label: "Active members",
      value: `${report.members}`,
      detail: `${report.signals} replies and mentions`,
    },
  ];
  const ev = report.effectiveVoices;
  const top = report.top;
  if (ev && top && report.influence) {
    const shown = disclose(report, policy);
    const named = memberLabeller(report.influence, policy);
    const label = (member: string) => (shown.individual ? named(member) : "one member");
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
          ? `one member's share is above it, probability ${probability(report.line.probability)}`
          : "nobody is clearly above it",
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
    ...(args.formatLines ?? []).map((text): Block => ({ kind: "note", text })),
  ];
  if (report.status === "insufficient") {
    blocks.push({ kind: "note", text: neededText(report) });
  } else {
    blocks.push({ kind: "note", text: plainReading(report) });
    blocks.push({ kind: "figures", rows: figureRows(args) });
    const shown = disclose(report, args.policy);
    const hidden = hiddenGroupRows(shown);
    if (shown.groups && shown.groups.length + hidden.length > 0) {
      blocks.push({
        kind: "figures",
        rows: [
          { label: "Groups", value: "share of influence", detail: "share of members" },
          ...shown.groups.map((g) => ({
            label: `  ${g.group}`,
            value: `${percent(g.share)}, interval ${percentRange(g.low, g.high)}`,
            detail: `${percent(g.headcountShare)} of members (${g.members})`,
          })),
          ...hidden,
        ],
      });
    }
    if (shown.withheld) blocks.push({ kind: "note", text: shown.withheld });
    const bars = shown.individual ? shareBars(report, args.policy) : null;
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
  // The chart shows individual shares: never where the text withholds them.
  if (!disclose(args.report, args.policy).individual) return { blocks, text };
  const svg = shareBarsChart(args.report, args.policy, { maxBars: DIGEST_MAX_BARS });
  if (svg === null) return { blocks, text };
  return { blocks, text, chart: { svg, alt: chartAltText(args.report) } };
}
