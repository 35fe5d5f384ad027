/**
 * @module summary-blocks
 * The analysis summary as neutral blocks: headline figures, the share bars with their intervals
 * and the line, structure, groups, contributors, a plain reading and the cautions.
 */

import type { Block, FigureRow } from "../domain/blocks.js";
import type { AnalysisReport } from "../domain/report.js";
import { CAUTIONS_LINE } from "./cautions.js";
import { neededText, shareBars, structureText, windowText } from "./digest-blocks.js";
import { decimal1, percent, percentRange, voicesOf } from "./format.js";
import { memberLabeller, type NamingPolicy } from "./naming.js";
import { plainReading } from "./reading.js";

function aboveLine(who: string): string {
  return who.startsWith("you") ? "you are above it" : `${who} is above it`;
}

/** Blocks summarising one report for a reader with the given naming policy. */
export function summaryBlocks(
  report: AnalysisReport,
  policy: NamingPolicy,
  options: { title?: string; maxBars?: number } = {},
): Block[] {
  const blocks: Block[] = [
    { kind: "heading", text: options.title ?? `Influence balance · ${report.channel}` },
    { kind: "note", text: windowText(report) },
  ];
  if (report.status === "insufficient") {
    blocks.push({ kind: "note", text: neededText(report) });
    blocks.push({ kind: "cautions", text: CAUTIONS_LINE });
    return blocks;
  }
  if (
    report.status === "no-unique-shares" ||
    !report.influence ||
    !report.top ||
    !report.effectiveVoices
  ) {
    blocks.push({ kind: "note", text: plainReading(report) });
    blocks.push({ kind: "figures", rows: [{ label: "Structure", value: structureText(report) }] });
    blocks.push({ kind: "cautions", text: CAUTIONS_LINE });
    return blocks;
  }
  const label = memberLabeller(report.influence, policy);
  const ev = report.effectiveVoices;
  const rows: FigureRow[] = [
    { label: "Active members", value: `${report.members}`, detail: `${report.signals} signals` },
    {
      label: "Effective voices",
      value: voicesOf(ev.value, report.members),
      detail: `interval ${decimal1(ev.low)}–${decimal1(ev.high)}; balance ${report.balance?.toFixed(2)}`,
    },
    {
      label: "Largest share",
      value: percent(report.top.share),
      detail: `interval ${percentRange(report.top.low, report.top.high)}; ${label(report.top.member)}`,
    },
  ];
  if (report.line) {
    rows.push({
      label: "Line",
      value: percent(report.line.threshold),
      detail: report.line.crossed
        ? `crossed: ${aboveLine(label(report.line.member ?? ""))} with probability ${percent(report.line.probability)}`
        : `not crossed; nobody is above it with probability ${percent(report.settings.confidence)} or more`,
    });
  }
  rows.push({ label: "Structure", value: structureText(report) });
  if (report.hhi !== null && report.concentration) {
    rows.push({
      label: "HHI (analogy)",
      value: `${report.hhi}`,
      detail: `would count as ${report.concentration === "high" ? "highly concentrated (above 1,800)" : "not highly concentrated (1,800 or below)"} under the 2023 U.S. merger guidelines`,
    });
  }
  blocks.push({ kind: "note", text: plainReading(report) });
  blocks.push({ kind: "figures", rows });
  const bars = shareBars(report, policy, options.maxBars ?? 20);
  if (bars) blocks.push(bars);
  const groups = report.groups ?? report.clusters?.groups ?? null;
  // One cluster covering everyone says nothing: clusters are shown only when there are several.
  if (groups && (report.groups ? groups.length > 0 : groups.length > 1)) {
    const title = report.groups
      ? "Groups"
      : `Clusters found in the replies (modularity ${report.clusters?.modularity.toFixed(2)}, unnamed)`;
    blocks.push({
      kind: "figures",
      rows: [
        { label: title, value: "" },
        ...groups.map((g) => ({
          label: `  ${g.group}`,
          value: `${percent(g.share)} of influence`,
          detail: `${percent(g.headcountShare)} of members (${g.members}); interval ${percentRange(g.low, g.high)}`,
        })),
      ],
    });
  }
  if (report.contributors && report.contributors.length > 0) {
    const top = report.contributors
      .slice(0, 5)
      .map((c) => `${label(c.member)} ${percent(c.share)}`);
    blocks.push({ kind: "note", text: `Where the largest share comes from: ${top.join(", ")}.` });
  }
  blocks.push({ kind: "cautions", text: CAUTIONS_LINE });
  return blocks;
}
