/**
 * @module reading
 * The one-line reading in plain words that tops a summary. Its verdict comes from the line and the
 * largest share first, and only then from balance, so it can never say "spread fairly evenly" while
 * someone is above the line: above the line (the line is crossed), close to the line (the largest
 * share is within 5 points of it, or its probability of being above reaches 20%, without crossing),
 * or, when nobody is near the line, how even attention is. The balance cut-offs (0.7, 0.4), the
 * 5 points and the 20% are our own reading aids, not published cut-offs.
 */
import type { AnalysisReport } from "../domain/report.js";
import { decimal1, percent, probability } from "./format.js";

/** The headline's verdict, for tests and for surfaces that colour it. */
export type Verdict = "none" | "separate" | "above" | "near" | "even" | "leans" | "funnels";

/** Within this many points of the line (or this probability) the largest share is "close". */
const NEAR_POINTS = 0.05;
const NEAR_PROBABILITY = 0.2;

export function verdictOf(report: AnalysisReport): Verdict {
  if (report.status === "insufficient") return "none";
  if (
    report.status === "no-unique-shares" ||
    !report.effectiveVoices ||
    report.balance === null ||
    !report.top
  ) {
    return "separate";
  }
  const line = report.line;
  if (line?.crossed) return "above";
  if (
    line &&
    (report.top.share >= line.threshold - NEAR_POINTS || report.top.pAbove >= NEAR_PROBABILITY)
  ) {
    return "near";
  }
  if (report.balance >= 0.7) return "even";
  if (report.balance >= 0.4) return "leans";
  return "funnels";
}

export function plainReading(report: AnalysisReport): string {
  const verdict = verdictOf(report);
  if (verdict === "none") return "Not enough opted-in activity yet to say anything reliable.";
  if (verdict === "separate" || !report.effectiveVoices || !report.top) {
    return "The channel splits into groups that only answer among themselves, so it has no single shared view.";
  }
  const voices = `about ${decimal1(report.effectiveVoices.value)} independent voices of ${report.members}`;
  const top = percent(report.top.share);
  const line = report.line;
  const below = line
    ? `the largest share, ${top}, is below the ${percent(line.threshold)} line`
    : `the largest share is ${top}`;
  let text: string;
  switch (verdict) {
    case "above":
      text = `Attention leans on one member: the largest share, ${top}, is above the ${percent(line?.threshold ?? 0)} line (probability ${probability(line?.probability ?? 0)}). The channel's shared view is worth ${voices}.`;
      break;
    case "near":
      text = `The largest share, ${top}, is close to the ${percent(line?.threshold ?? 0)} line but not clearly above it (probability ${probability(report.top.pAbove)}). The channel's shared view is worth ${voices}.`;
      break;
    case "even":
      text = `Attention is spread fairly evenly: the channel's shared view is worth ${voices}, and ${below}.`;
      break;
    case "leans":
      text = `Attention leans toward a few members: the channel's shared view is worth ${voices}, and ${below}.`;
      break;
    default:
      text = `Attention funnels into few voices: the channel's shared view is worth only ${voices}, and ${below}.`;
  }
  const c = report.consensus;
  const settle =
    c && c.closedGroups > 1
      ? ` But the channel splits into ${c.closedGroups} groups that only answer among themselves, so their views need not come together.`
      : c && !c.reached
        ? " Some views may never come together on this pattern."
        : "";
  return text + settle;
}
