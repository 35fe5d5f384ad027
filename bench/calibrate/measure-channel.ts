/**
 * @module measure-channel
 * One calibration job: draw a true channel, simulate its signals, run the product path
 * (`analyzeSnapshot`, the computation behind `plumbline analyze --json`) once per decay setting
 * asked for, and compare the report's intervals, top and line with the truth. The same simulated
 * channel is analysed with and without decay, so the two settings are compared on paired data.
 * Every figure read here comes from the report; nothing of the model is recomputed.
 */
import { analyzeSnapshot } from "../../src/analysis/analyze-snapshot.js";
import {
  type AnalysisSettings,
  DEFAULT_SETTINGS,
  resolveThreshold,
} from "../../src/domain/settings.js";
import { hashString32 } from "../../src/ports/rng.js";
import { pointAtExpectedCounts } from "./expected-point.js";
import { simulateChannel } from "./simulate-channel.js";
import { type Regime, trueChannel } from "./true-matrix.js";

export type Decay = "decay" | "none";

export const DECAYS: readonly Decay[] = ["decay", "none"];

/** What one job asks for: channel number `index` of (regime, n, ratio) under `seed`. */
export interface ChannelJob {
  readonly regime: Regime;
  readonly n: number;
  readonly ratio: number;
  readonly index: number;
  readonly seed: number;
  readonly decays: readonly Decay[];
  /** Also compute the point estimate at the expected counts (leader regimes only). */
  readonly shrinkage: boolean;
  /** Settings that replace the product defaults (`--set key=value`), e.g. a prior strength. */
  readonly overrides?: Readonly<Record<string, number | string | boolean | null>>;
}

/** What one analysis of one channel showed, against the truth. */
export interface ChannelResult {
  readonly regime: Regime;
  readonly n: number;
  readonly ratio: number;
  readonly decay: Decay;
  readonly index: number;
  /** The report had figures (always expected: n ≥ 8 and N ≥ 40). */
  readonly sufficient: boolean;
  /** Member-intervals compared, and how many held the truth, lay below it, lay above it. */
  readonly intervals: number;
  readonly covered: number;
  /** Interval entirely below the true share (the model under-states). */
  readonly below: number;
  readonly above: number;
  /** Leader regimes: the leader's designed share, reported share and interval. */
  readonly leader: {
    readonly truth: number;
    readonly share: number;
    readonly low: number;
    readonly high: number;
    /** Point at the expected counts, when asked for. */
    readonly expected: number | null;
  } | null;
  readonly line: number;
  /** Largest true share. */
  readonly trueTop: number;
  readonly crossed: boolean;
}

/** Seed of one channel: the same for both decay settings. */
export function channelSeed(job: Pick<ChannelJob, "regime" | "n" | "ratio" | "index" | "seed">) {
  return hashString32(`${job.seed}|${job.regime}|${job.n}|${job.ratio}|${job.index}`);
}

/** The analysis settings of a decay setting: the product defaults (or overrides), clusters off. */
export function settingsFor(
  decay: Decay,
  overrides: ChannelJob["overrides"] = {},
): AnalysisSettings {
  const base = { ...DEFAULT_SETTINGS, ...overrides } as AnalysisSettings;
  return {
    ...base,
    halfLifeDays: decay === "none" ? 0 : base.halfLifeDays,
    // Louvain clusters do not enter any figure read here; leaving them out saves time.
    clusters: false,
  };
}

/** Runs one job (see the module header). */
export function measureChannel(job: ChannelJob): ChannelResult[] {
  const seed = channelSeed(job);
  const line = resolveThreshold(DEFAULT_SETTINGS.threshold, job.n);
  const truth = trueChannel({ regime: job.regime, n: job.n, seed, line });
  const channel = `cal-${job.regime}-${job.n}-${job.ratio}-${job.index}-${job.seed}`;
  const sim = simulateChannel({
    truth,
    ratio: job.ratio,
    seed: seed ^ 0x5bd1e995,
    channel,
    windowDays: DEFAULT_SETTINGS.windowDays,
  });
  const index = new Map<string, number>();
  sim.members.forEach((member, i) => {
    index.set(member, i);
  });
  const trueTop = truth.shares.reduce((top, s) => Math.max(top, s), 0);
  const expected =
    job.shrinkage && truth.leader !== null
      ? pointAtExpectedCounts(truth, job.ratio, sim.members, settingsFor("none", job.overrides))[
          truth.leader
        ]
      : null;
  return job.decays.map((decay) => {
    const report = analyzeSnapshot(sim.snapshot, settingsFor(decay, job.overrides), {
      until: sim.until,
    });
    let covered = 0;
    let below = 0;
    let above = 0;
    let leader: ChannelResult["leader"] = null;
    for (const entry of report.influence ?? []) {
      const i = index.get(entry.member);
      if (i === undefined) throw new Error(`report names unknown member ${entry.member}`);
      const s = truth.shares[i];
      if (entry.high < s) below++;
      else if (entry.low > s) above++;
      else covered++;
      if (i === truth.leader) {
        leader = {
          truth: s,
          share: entry.share,
          low: entry.low,
          high: entry.high,
          expected,
        };
      }
    }
    const reportLine = report.line?.threshold ?? line;
    return {
      regime: job.regime,
      n: job.n,
      ratio: job.ratio,
      decay,
      index: job.index,
      sufficient: report.sufficient,
      intervals: covered + below + above,
      covered,
      below,
      above,
      leader,
      line: reportLine,
      trueTop,
      crossed: report.line?.crossed ?? false,
    };
  });
}
