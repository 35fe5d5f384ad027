/**
 * @module reading
 * The one-line reading in plain words that tops a summary: how even attention is, whether the
 * channel settles, and whether someone is above the line. Thresholds on balance (0.7, 0.4) are our
 * own reading aids, not published cut-offs.
 */
import type { AnalysisReport } from "../domain/report.js";
import { decimal1, percent } from "./format.js";

export function plainReading(report: AnalysisReport): string {
  if (report.status === "insufficient") {
    return "Not enough opted-in activity yet to say anything reliable.";
  }
  if (report.status === "no-unique-shares" || !report.effectiveVoices || report.balance === null) {
    return "The channel splits into groups that only listen among themselves, so it has no single pooled view.";
  }
  const voices = decimal1(report.effectiveVoices.value);
  const spread =
    report.balance >= 0.7
      ? `Attention is spread fairly evenly: the pooled view is worth about ${voices} independent voices of ${report.members}.`
      : report.balance >= 0.4
        ? `Attention leans toward a few members: the pooled view is worth about ${voices} independent voices of ${report.members}.`
        : `Attention funnels into few voices: the pooled view is worth only about ${voices} independent voices of ${report.members}.`;
  const line = report.line?.crossed
    ? ` One member is likely above the ${percent(report.line.threshold)} line (${percent(report.line.probability)} sure).`
    : "";
  const settle =
    report.consensus && !report.consensus.reached ? " Views may not settle on one consensus." : "";
  return spread + line + settle;
}
