/**
 * @module format-blocks
 * Format comparisons and trial verdicts as neutral blocks, in everyday words: each format's
 * figures with their ranges, which periods were left out and why, how sure the difference is,
 * and the time warning when one format ran only before the other while the channel drifted; and
 * a format trial's weekly switch.
 */
import type { FormatsReport } from "../analysis/compare-formats.js";
import { MARGIN } from "../analysis/compare-formats.js";
import { type TrialPlan, trialEnd, WEEK_MS } from "../analysis/format-trial.js";
import type { Block, FigureRow } from "../domain/blocks.js";
import { CAUTIONS_LINE } from "./cautions.js";
import { decimal1, isoDay, percent, percentRange, probability } from "./format.js";

/**
 * True when the figure as printed lies above its range as printed. Balance (and effective voices)
 * peak at a perfectly even channel, so on a very even one every uncertain reading falls below the
 * point; the range then sits just under it (e.g. 1.00 with 0.95–0.99).
 */
function aboveRange(f: FormatsReport["formats"][number]): boolean {
  if (!f.balance || !f.effectiveVoices) return false;
  const b = f.balance;
  const ev = f.effectiveVoices;
  return (
    Number(b.value.toFixed(2)) > Number(b.high.toFixed(2)) ||
    Number(decimal1(ev.value)) > Number(decimal1(ev.high))
  );
}

/** The note for formats whose balance is printed above its range; null when none is. */
export function aboveRangeNote(report: FormatsReport): string | null {
  const names = report.formats.filter(aboveRange).map((f) => f.format);
  if (names.length === 0) return null;
  const which = names.length === 1 ? names[0] : names.join(" and ");
  return `For ${which} the range lies just below the figure: balance cannot go past 1.00, and on a channel this even every uncertain reading falls below it. Read it as "about as even as this much data can show", at least the range's lower end.`;
}

function formatRow(f: FormatsReport["formats"][number]): FigureRow {
  if (!f.balance || !f.effectiveVoices || !f.topShare) {
    return {
      label: f.format,
      value: "no figures",
      detail: "no period of this format had enough data",
    };
  }
  const ev = f.effectiveVoices;
  return {
    label: f.format,
    value: `balance ${f.balance.value.toFixed(2)} (${f.balance.low.toFixed(2)}–${f.balance.high.toFixed(2)})`,
    detail: `${decimal1(ev.value)} effective voices (${decimal1(ev.low)}–${decimal1(ev.high)}), largest share ${percent(f.topShare.value)} (${percentRange(f.topShare.low, f.topShare.high)}); ${f.periods} period${f.periods === 1 ? "" : "s"}, ${Math.round(f.days)} days`,
  };
}

/** The plain-words verdict sentence of a pair. */
export function verdictText(pair: NonNullable<FormatsReport["pair"]>): string {
  const sure = probability(pair.pBMoreBalanced);
  const margin = MARGIN.toFixed(2);
  if (pair.verdict === "b more balanced") {
    return `"${pair.b}" spread influence more evenly than "${pair.a}": the chance that it is more balanced is ${sure}, and the gain is likely at least ${margin} in balance.`;
  }
  if (pair.verdict === "a more balanced") {
    return `"${pair.a}" spread influence more evenly than "${pair.b}": the chance that "${pair.b}" is more balanced is only ${sure}, and the loss is likely at least ${margin} in balance.`;
  }
  return `No clear difference between "${pair.a}" and "${pair.b}" yet: the chance that "${pair.b}" is more balanced is ${sure}, which is not enough to call a difference of ${margin} or more in balance.`;
}

export const TIME_WARNING =
  "Careful: one format ran only before the other, and the channel's balance drifted week by week inside them, so the difference may come from the passing weeks rather than the format. A format trial (/influence format trial A B weeks 4) takes turns week by week and avoids this.";

export function formatsBlocks(report: FormatsReport, title = "Formats compared"): Block[] {
  const blocks: Block[] = [{ kind: "heading", text: `${title} · ${report.channel}` }];
  if (report.formats.length === 0) {
    blocks.push({
      kind: "note",
      text: "No format periods yet. A facilitator starts one with /influence format <name>, e.g. /influence format written-first, and ends it with /influence format end.",
    });
    return blocks;
  }
  blocks.push({ kind: "figures", rows: report.formats.map(formatRow) });
  const above = aboveRangeNote(report);
  if (above !== null) blocks.push({ kind: "note", text: above });
  const left = report.periods.filter((p) => p.leftOut !== null);
  if (left.length > 0) {
    blocks.push({
      kind: "note",
      text: `Left out: ${left.map((p) => `${p.format} ${isoDay(p.start)}..${isoDay(p.end)} (${p.leftOut})`).join("; ")}.`,
    });
  }
  if (report.pair) {
    const change = report.pair.balanceChange;
    blocks.push({ kind: "note", text: verdictText(report.pair) });
    blocks.push({
      kind: "note",
      text: `Change in balance from "${report.pair.a}" to "${report.pair.b}": ${signed(change.value)} (likely between ${signed(change.low)} and ${signed(change.high)}).`,
    });
    if (report.pair.confoundedWithTime) blocks.push({ kind: "note", text: TIME_WARNING });
  } else {
    blocks.push({
      kind: "note",
      text: "A comparison needs two formats that each have a period with enough data.",
    });
  }
  blocks.push({ kind: "cautions", text: CAUTIONS_LINE });
  return blocks;
}

function signed(x: number): string {
  const t = x.toFixed(2);
  return x > 0 && t !== "0.00" ? `+${t}` : t === "-0.00" ? "0.00" : t.replace("-", "−");
}

/** The post at the start of a trial's week `week` (0-based, ≥ 1): which format runs now. */
export function trialWeekBlocks(plan: TrialPlan, week: number): Block[] {
  const format = plan.schedule[week];
  const weekEnd = isoDay(new Date(plan.start + (week + 1) * WEEK_MS).toISOString());
  const last = week === plan.weeks - 1;
  const next = last
    ? `This is the trial's last week; the bot posts the result on ${isoDay(new Date(trialEnd(plan)).toISOString())}.`
    : `Next week: ${plan.schedule[week + 1]}.`;
  return [
    {
      kind: "heading",
      text: `Format trial · week ${week + 1} of ${plan.weeks}: ${format}`,
    },
    {
      kind: "note",
      text: `From now until ${weekEnd} the channel runs its discussion as ${format}; replies and mentions in this week count for ${format}. ${next}`,
    },
    {
      kind: "note",
      text: `The formats ${plan.a} and ${plan.b} take turns week by week, so a drift over the weeks or one busy week falls on both. /influence format list shows the plan.`,
    },
  ];
}
