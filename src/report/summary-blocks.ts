/**
 * @module summary-blocks
 * The analysis summary as neutral blocks: headline figures, the share bars with their intervals
 * and the line, structure, groups, contributors, a plain reading and the cautions.
 */

import type { Block, FigureRow } from "../domain/blocks.js";
import type { AnalysisReport } from "../domain/report.js";
import { CAUTIONS_LINE } from "./cautions.js";
import { neededText, RANK_LABELS, shareBars, structureText, windowText } from "./digest-blocks.js";
import { disclose, hiddenGroupRows } from "./disclosure.js";
import { decimal1, percent, percentRange, probability, voicesOf } from "./format.js";
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
  const shown = disclose(report, policy);
  const named = memberLabeller(report.influence, policy);
  const label = (member: string) => (shown.individual ? named(member) : "one member");
  const ev = report.effectiveVoices;
  const rows: FigureRow[] = [
    {
      label: "Active members",
      value: `${report.members}`,
      detail: `${report.signals} replies and mentions`,
    },
    {
      label: "Effective voices",
      value: voicesOf(ev.value, report.members),
      detail: `interval ${decimal1(ev.low)}–${decimal1(ev.high)}; balance ${report.balance?.toFixed(2)}`,
    },
    {
      label: "Largest share",
      value: percent(report.top.share),
      detail: `interval ${percentRange(report.top.low, report.top.high)}${shown.individual ? `; ${label(report.top.member)}` : ""}`,
    },
  ];
  if (report.line) {
    rows.push({
      label: "Line",
      value: percent(report.line.threshold),
      detail: report.line.crossed
        ? `${aboveLine(label(report.line.member ?? ""))}, probability ${probability(report.line.probability)}`
        : `nobody is above it with probability ${percent(report.settings.confidence)} or more`,
    });
  }
  rows.push({ label: "Structure", value: structureText(report) });
  // The concentration index (HHI) is a term of the trade: it stays in the CLI's --json and in
  // `explain more`, not in a check (DESIGN.md §1).
  blocks.push({ kind: "note", text: plainReading(report) });
  blocks.push({ kind: "figures", rows });
  if (shown.withheld) blocks.push({ kind: "note", text: shown.withheld });
  // "member k" is explained in a note of its own (the page shows the note but draws the bars).
  const bars = shown.individual ? shareBars(report, policy, options.maxBars ?? 20, false) : null;
  if (bars) blocks.push(bars);
  const labelsShown = [
    ...(bars?.kind === "bars" ? bars.rows.map((r) => r.label) : []),
    label(report.top.member),
    ...(report.contributors ?? []).slice(0, 5).map((c) => label(c.member)),
  ];
  if (labelsShown.some((l) => /^member \d+$/.test(l))) {
    blocks.push({ kind: "note", text: `${RANK_LABELS}.` });
  }
  const groups = shown.groups ?? shown.clusters?.groups ?? null;
  const hidden = hiddenGroupRows(shown);
  // One cluster covering everyone says nothing: clusters are shown only when there are several.
  if (groups && (report.groups ? groups.length + hidden.length > 0 : groups.length > 1)) {
    const title = report.groups
      ? "Groups"
      : "Groups found in who answers whom (found by plumbline, not named by anyone)";
    blocks.push({
      kind: "figures",
      rows: [
        { label: title, value: "" },
        ...groups.map((g) => ({
          label: `  ${g.group}`,
          value: `${percent(g.share)} of influence`,
          detail: `${percent(g.headcountShare)} of members (${g.members}); interval ${percentRange(g.low, g.high)}`,
        })),
        ...hidden,
      ],
    });
  }
  if (shown.individual && report.contributors && report.contributors.length > 0) {
    const top = report.contributors
      .slice(0, 5)
      .map((c) => `${label(c.member)} ${percent(c.share)}`);
    blocks.push({ kind: "note", text: `Where the largest share comes from: ${top.join(", ")}.` });
  }
  blocks.push({ kind: "cautions", text: CAUTIONS_LINE });
  return blocks;
}
