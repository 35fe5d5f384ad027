/**
 * @module compare-blocks
 * Compare and what-if results as neutral blocks: the two periods (or before/after) side by side
 * on the headline figures, the change, and how sure the change is.
 */

import type { CompareReport } from "../analysis/compare-periods.js";
import type { WhatIfReport } from "../analysis/what-if.js";
import type { Block, FigureRow } from "../domain/blocks.js";
import type { AnalysisReport } from "../domain/report.js";
import { CAUTIONS_LINE } from "./cautions.js";
import { decimal1, percent, percentRange } from "./format.js";

function headline(report: AnalysisReport): string {
  if (report.status === "insufficient") {
    return `too little data (${report.members} members, ${report.signals} signals)`;
  }
  if (!report.effectiveVoices || !report.top) return "no single pooled view (separate groups)";
  const ev = report.effectiveVoices;
  return `${decimal1(ev.value)} of ${report.members} effective voices (${decimal1(ev.low)}–${decimal1(ev.high)}), balance ${report.balance?.toFixed(2)}, largest share ${percent(report.top.share)} (${percentRange(report.top.low, report.top.high)})`;
}

function signed(x: number, digits: number): string {
  return `${x >= 0 ? "+" : "−"}${Math.abs(x).toFixed(digits)}`;
}

export function compareBlocks(result: CompareReport): Block[] {
  const rows: FigureRow[] = [
    { label: `A ${result.a.range}`, value: headline(result.a.report) },
    { label: `B ${result.b.range}`, value: headline(result.b.report) },
  ];
  const c = result.change;
  if (c.effectiveVoices !== null && c.balance !== null && c.topShare !== null) {
    rows.push({
      label: "Change B − A",
      value: `effective voices ${signed(c.effectiveVoices, 1)}, balance ${signed(c.balance, 2)}, largest share ${signed(c.topShare * 100, 0)} points`,
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
      text: `Probability that B is more balanced than A: ${percent(p)}, so ${verdict}.`,
    });
  } else {
    blocks.push({ kind: "note", text: "No probability: one of the periods has no figures." });
  }
  blocks.push({ kind: "cautions", text: CAUTIONS_LINE });
  return blocks;
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
  const c = result.change;
  if (c.effectiveVoices !== null && c.topShare !== null) {
    blocks.push({
      kind: "note",
      text: `Effective voices would change by ${signed(c.effectiveVoices, 1)} and the largest share by ${signed(c.topShare * 100, 0)} points. This is a model of a different meeting habit, not a forecast.`,
    });
  }
  blocks.push({ kind: "cautions", text: CAUTIONS_LINE });
  return blocks;
}
