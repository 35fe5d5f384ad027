/**
 * @module compare-blocks
 * Compare and what-if results as neutral blocks: the two periods (or before/after) side by side
 * on the headline figures, the change, and how sure the change is. Every change is computed from
 * the rounded figures printed beside it (format.ts), so the reader's own subtraction agrees.
 */

import type { CompareReport } from "../analysis/compare-periods.js";
import type { WhatIfReport } from "../analysis/what-if.js";
import type { Block, FigureRow } from "../domain/blocks.js";
import type { AnalysisReport } from "../domain/report.js";
import { CAUTIONS_LINE } from "./cautions.js";
import { decimal1, percent, percentRange, printedChange, probability } from "./format.js";

/** The printed headline figures of one report, or null when it has none. */
interface Printed {
  readonly voices: string;
  readonly balance: string;
  readonly top: string;
}

function printed(report: AnalysisReport): Printed | null {
  if (!report.effectiveVoices || !report.top || report.balance === null) return null;
  return {
    voices: decimal1(report.effectiveVoices.value),
    balance: report.balance.toFixed(2),
    top: percent(report.top.share),
  };
}

function headline(report: AnalysisReport): string {
  if (report.status === "insufficient") {
    return `too little data (${report.members} active member${report.members === 1 ? "" : "s"}, ${report.signals} ${report.signals === 1 ? "reply or mention" : "replies and mentions"})`;
  }
  const p = printed(report);
  if (!p || !report.effectiveVoices || !report.top) {
    return "no single shared view (groups that only answer among themselves)";
  }
  const ev = report.effectiveVoices;
  return `${p.voices} of ${report.members} effective voices (${decimal1(ev.low)}–${decimal1(ev.high)}), balance ${p.balance}, largest share ${p.top} (${percentRange(report.top.low, report.top.high)})`;
}

/** "effective voices +6.1" or "effective voices no change", from printed texts. */
function change(what: string, before: string, after: string, digits: number, unit = ""): string {
  const delta = printedChange(before, after, digits);
  if (delta === null) return `${what} no change`;
  const one = Math.abs(Number.parseFloat(delta.replace("−", "-"))) === 1;
  return `${what} ${delta}${unit ? ` ${unit}${one ? "" : "s"}` : ""}`;
}

export function compareBlocks(result: CompareReport): Block[] {
  const rows: FigureRow[] = [
    { label: `A ${result.a.range}`, value: headline(result.a.report) },
    { label: `B ${result.b.range}`, value: headline(result.b.report) },
  ];
  const a = printed(result.a.report);
  const b = printed(result.b.report);
  if (a && b) {
    rows.push({
      label: "Change B − A",
      value: [
        change("effective voices", a.voices, b.voices, 1),
        change("balance", a.balance, b.balance, 2),
        change("largest share", a.top, b.top, 0, "point"),
      ].join(", "),
    });
  }
  const blocks: Block[] = [
    { kind: "heading", text: `Compare periods · ${result.channel}` },
    { kind: "figures", rows },
  ];
  if (result.pBMoreBalanced !== null) {
    const p = result.pBMoreBalanced;
    const verdict =
      p >= 0.9
        ? "B is very likely more balanced than A"
        : p >= 0.7
          ? "B is probably more balanced than A"
          : p > 0.3
            ? "the data cannot tell which period is more balanced"
            : p > 0.1
              ? "A is probably more balanced than B"
              : "A is very likely more balanced than B";
    blocks.push({
      kind: "note",
      text: `Probability that B is more balanced than A: ${probability(p)}, so ${verdict}.`,
    });
  } else {
    blocks.push({ kind: "note", text: "No probability: one of the periods has no figures." });
  }
  blocks.push({ kind: "cautions", text: CAUTIONS_LINE });
  return blocks;
}

/** A cap within 2% of the smallest possible one leaves as good as no room: our reading aid. */
const FORCED_SLACK = 0.02;

/**
 * True when the cap leaves no choice: with n members each one can give at most `cap` to any one of
 * the n − 1 others (a lower cap is refused as infeasible), so a cap of 1/(n − 1), or barely more,
 * forces everyone to spread their attention (almost) evenly, and every share is then about 1/n
 * whatever was counted (the even chain's stationary vector is uniform).
 */
export function capForcesEven(cap: number, members: number): boolean {
  return members >= 2 && cap * (members - 1) <= 1 + FORCED_SLACK;
}

export function whatIfBlocks(result: WhatIfReport): Block[] {
  const rows: FigureRow[] = [
    { label: "As counted", value: headline(result.before) },
    { label: `Capped at ${percent(result.cap)}`, value: headline(result.after) },
  ];
  const blocks: Block[] = [
    {
      kind: "heading",
      text: `What if no one gave any one member more than ${percent(result.cap)} of their attention · ${result.channel}`,
    },
    { kind: "figures", rows },
  ];
  const before = printed(result.before);
  const after = printed(result.after);
  if (before && after) {
    const voices = printedChange(before.voices, after.voices, 1);
    const top = printedChange(before.top, after.top, 0);
    const said =
      voices === null && top === null
        ? `Effective voices (${after.voices}) and the largest share (${after.top}) would not change.`
        : `Effective voices would ${voices === null ? `not change (${after.voices})` : `change by ${voices} (${before.voices} → ${after.voices})`} and the largest share ${top === null ? `would not change (${after.top})` : `by ${top} point${Math.abs(Number.parseFloat(top.replace("−", "-"))) === 1 ? "" : "s"} (${before.top} → ${after.top})`}.`;
    blocks.push({
      kind: "note",
      text: `${said} This is a model of a different meeting habit, not a forecast.`,
    });
  }
  const n = result.before.members;
  if (after && capForcesEven(result.cap, n)) {
    blocks.push({
      kind: "note",
      text: `Why the capped figures have no spread: with ${n} active members, each member has ${n - 1} others to turn to, and ${n - 1} × ${percent(result.cap)} is ${result.cap * (n - 1) <= 1 + 1e-9 ? "already 100%" : "barely more than 100%"}: no room is left to favour anyone, so a cap of ${percent(result.cap)} makes everyone spread their attention evenly. Every share is then about ${percent(1 / n)}, whatever was counted. Try a larger cap to see a habit that still leaves room for preferences.`,
    });
  }
  blocks.push({ kind: "cautions", text: CAUTIONS_LINE });
  return blocks;
}
