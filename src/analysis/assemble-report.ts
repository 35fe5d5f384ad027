/**
 * @module assemble-report
 * Turns the numerical results into the `AnalysisReport` fields of DESIGN.md §5 and §4.7–4.10:
 * intervals, the line, effective voices, balance, HHI bands, contributors, attention received,
 * structure and group shares. Every number is rounded to 6 decimals (HHI to a whole number).
 */
import type { AttentionInput, IndexGroups } from "../domain/counts.js";
import type {
  AnalysisReport,
  Concentration,
  GroupFigure,
  InfluenceEntry,
} from "../domain/report.js";
import { REPORT_VERSION } from "../domain/report.js";
import { type AnalysisSettings, DAY_MS } from "../domain/settings.js";
import type { InfluenceResult } from "../influence/analyze-influence.js";
import { effectiveVoicesOf } from "../influence/analyze-influence.js";
import { columnSums } from "../influence/attention-rows.js";
import { contributorsTo } from "../influence/contributors.js";
import { centralInterval, shareAtOrAbove } from "../influence/interval.js";
import { posteriorMethod } from "../influence/posterior-draws.js";

/** Fields every report has, whatever the data. */
export type ReportFrame = Pick<
  AnalysisReport,
  "version" | "channel" | "window" | "settings" | "members" | "signals"
> & { readonly threshold: number; readonly confidence: number; readonly interval: number };

const NO_FIGURES = {
  influence: null,
  top: null,
  effectiveVoices: null,
  balance: null,
  hhi: null,
  concentration: null,
  consensus: null,
  contributors: null,
  groups: null,
  clusters: null,
  line: null,
} as const;

export function round6(x: number): number {
  if (!Number.isFinite(x)) return x;
  const r = Math.round(x * 1e6) / 1e6;
  return Object.is(r, -0) ? 0 : r;
}

export function reportFrame(args: {
  channel: string;
  until: number;
  settings: AnalysisSettings;
  seed: number;
  threshold: number;
  input: AttentionInput;
}): ReportFrame {
  const { settings, until } = args;
  return {
    version: REPORT_VERSION,
    channel: args.channel,
    window: {
      from: new Date(until - settings.windowDays * DAY_MS).toISOString(),
      until: new Date(until).toISOString(),
      days: settings.windowDays,
      halfLifeDays: settings.halfLifeDays,
    },
    settings: {
      replyWeight: settings.replyWeight,
      mentionWeight: settings.mentionWeight,
      background: settings.background,
      priorStrength: null,
      posterior: posteriorMethod(args.input.counts.members.length),
      selfWeight: settings.selfWeight,
      samples: settings.samples,
      interval: settings.interval,
      seed: args.seed,
      threshold: round6(args.threshold),
      thresholdMode: settings.threshold === "auto" ? "auto" : "fixed",
      confidence: settings.confidence,
    },
    members: args.input.counts.members.length,
    signals: args.input.signals,
    threshold: args.threshold,
    confidence: settings.confidence,
    interval: settings.interval,
  };
}

function head(
  frame: ReportFrame,
): Omit<AnalysisReport, "status" | "sufficient" | "needed" | keyof typeof NO_FIGURES> {
  const { threshold: _t, confidence: _c, interval: _i, ...rest } = frame;
  return rest;
}

export function insufficientReport(
  frame: ReportFrame,
  needed: { members: number; signals: number },
): AnalysisReport {
  return { ...head(frame), status: "insufficient", sufficient: false, needed, ...NO_FIGURES };
}

export function noUniqueSharesReport(frame: ReportFrame, closedGroups: number): AnalysisReport {
  return {
    ...head(frame),
    status: "no-unique-shares",
    sufficient: true,
    needed: null,
    ...NO_FIGURES,
    consensus: { closedGroups, reached: false, secondEigenvalue: 1, roundsToHalve: null },
  };
}

/**
 * The 2023 U.S. Merger Guidelines (DOJ/FTC), Guideline 1: an HHI above 1,800 is "highly
 * concentrated". An analogy only, never for n < 7 (even shares of 6 members already give 1,667).
 */
export function concentrationBand(hhi: number, n: number): Concentration | null {
  if (n < 7) return null;
  return hhi > 1800 ? "high" : "below-high";
}

function memberDraws(draws: readonly Float64Array[], i: number): Float64Array {
  const out = new Float64Array(draws.length);
  for (let k = 0; k < draws.length; k++) out[k] = draws[k][i];
  return out;
}

function groupFigures(
  groups: readonly { name: string; members: readonly number[] }[],
  influence: InfluenceResult,
  n: number,
  mass: number,
): GroupFigure[] {
  const figures = groups.map(({ name, members }) => {
    let share = 0;
    for (const i of members) share += influence.shares[i];
    const sample = new Float64Array(influence.draws.length);
    influence.draws.forEach((d, k) => {
      let sum = 0;
      for (const i of members) sum += d[i];
      sample[k] = sum;
    });
    const { low, high } = centralInterval(sample, mass, share);
    return {
      group: name,
      members: members.length,
      share: round6(share),
      low: round6(low),
      high: round6(high),
      headcountShare: round6(members.length / n),
    };
  });
  return figures.sort((a, b) => b.share - a.share || (a.group < b.group ? -1 : 1));
}

function labelledGroups(labels: readonly (string | null)[]): { name: string; members: number[] }[] {
  const byLabel = new Map<string, number[]>();
  labels.forEach((label, i) => {
    if (label === null) return;
    const list = byLabel.get(label) ?? [];
    list.push(i);
    byLabel.set(label, list);
  });
  return [...byLabel].map(([name, members]) => ({ name, members }));
}

function clusterGroups(groups: IndexGroups): { name: string; members: readonly number[] }[] {
  return groups.map((members, k) => ({ name: `cluster ${k + 1}`, members }));
}

export function assembleReport(
  frame: ReportFrame,
  input: AttentionInput,
  influence: InfluenceResult,
): AnalysisReport {
  const { members } = input.counts;
  const n = members.length;
  const { shares, draws } = influence;
  const received = columnSums(influence.rows);
  const entries: InfluenceEntry[] = members.map((member, i) => {
    const sample = memberDraws(draws, i);
    const { low, high } = centralInterval(sample, frame.interval, shares[i]);
    return {
      member,
      share: round6(shares[i]),
      low: round6(low),
      high: round6(high),
      pAbove: round6(shareAtOrAbove(sample, frame.threshold, shares[i])),
      attentionReceived: round6(received[i]),
      named: input.named[i],
    };
  });
  const order = members.map((_, i) => i);
  // Sorted by the share as reported (rounded), so exact ties fall to the member id, not to noise.
  order.sort((a, b) => entries[b].share - entries[a].share || (members[a] < members[b] ? -1 : 1));
  const influenceSorted = order.map((i) => entries[i]);
  const topIndex = order[0];
  const topEntry = entries[topIndex];
  const voices = effectiveVoicesOf(shares);
  const voicesInterval = centralInterval(influence.effectiveVoicesDraws, frame.interval, voices);
  const hhi = Math.round(10000 / voices);
  const parts = contributorsTo(influence.rows, shares, topIndex);
  const contributors = order
    .filter((i) => i !== topIndex)
    .map((i) => ({ member: members[i], share: round6(parts[i]) }))
    .sort((a, b) => b.share - a.share || (a.member < b.member ? -1 : 1));
  const lambda2 = influence.secondEigenvalue;
  const closedGroups = input.closedGroups.length;
  const roundsToHalve =
    lambda2 >= 1 - 1e-9 ? null : lambda2 <= 1e-12 ? 0 : Math.log(0.5) / Math.log(lambda2);
  const crossing = [...entries].sort(
    (a, b) => b.pAbove - a.pAbove || b.share - a.share || (a.member < b.member ? -1 : 1),
  )[0];
  const crossed = crossing.pAbove >= frame.confidence;
  const labelled = labelledGroups(input.labels);
  const frameHead = head(frame);
  return {
    ...frameHead,
    settings: {
      ...frameHead.settings,
      priorStrength: round6(influence.priorStrength),
      posterior: influence.posterior,
    },
    status: "ok",
    sufficient: true,
    needed: null,
    influence: influenceSorted,
    top: {
      member: topEntry.member,
      share: topEntry.share,
      low: topEntry.low,
      high: topEntry.high,
      pAbove: topEntry.pAbove,
    },
    effectiveVoices: {
      value: round6(voices),
      low: round6(voicesInterval.low),
      high: round6(voicesInterval.high),
    },
    balance: round6(voices / n),
    hhi: n >= 7 ? hhi : null,
    concentration: concentrationBand(hhi, n),
    consensus: {
      closedGroups,
      reached: closedGroups === 1 && lambda2 < 1 - 1e-9,
      secondEigenvalue: round6(lambda2),
      roundsToHalve: roundsToHalve === null ? null : round6(roundsToHalve),
    },
    contributors,
    groups: labelled.length > 0 ? groupFigures(labelled, influence, n, frame.interval) : null,
    clusters:
      input.clusters && labelled.length === 0
        ? {
            modularity: round6(input.clusters.modularity),
            groups: groupFigures(
              clusterGroups(input.clusters.groups),
              influence,
              n,
              frame.interval,
            ),
          }
        : null,
    line: {
      threshold: round6(frame.threshold),
      crossed,
      member: crossed ? crossing.member : null,
      probability: crossing.pAbove,
    },
  };
}
