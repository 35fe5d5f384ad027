/**
 * @module analyze-influence
 * The numerical core every surface shares (DESIGN.md §4 steps 4–8, version 2): the prior toward
 * the channel's attention profile (attention-prior), point attention rows, the stationary vector,
 * K posterior draws on per-draw random streams (posterior-draws) and |λ2|.
 * An optional row transform (the what-if cap) is applied to the point rows and to every drawn row
 * set, so a what-if and its baseline use the same draws and compare pairwise.
 */
import type { CountMatrix } from "../domain/counts.js";
import {
  type Background,
  buildAttentionPrior,
  pointRowsFromPrior,
  type StrengthRowsRunner,
} from "./attention-prior.js";
import type { AttentionRows } from "./attention-rows.js";
import {
  type DrawPlan,
  type DrawRange,
  drawPlan,
  drawShares,
  posteriorMethod,
} from "./posterior-draws.js";
import { secondEigenvalue } from "./second-eigenvalue.js";
import { stationaryVector } from "./stationary-vector.js";

/**
 * Computes draws [0, samples) of `plan` elsewhere (worker threads), with the same result as
 * `drawShares(plan, 0, samples)`; null when it cannot, and the draws are made here. Once the
 * draws are under way it may call `meanwhile` on the calling thread (work that does not depend
 * on them, such as |λ2|), at most once.
 */
export type DrawRangeRunner = (
  plan: DrawPlan,
  samples: number,
  meanwhile?: () => void,
) => DrawRange | null;

export interface InfluenceOptions {
  /** "auto" (prior strength learnt per row) or a fixed strength α ≥ 0. */
  readonly background: Background;
  readonly selfWeight: number;
  readonly samples: number;
  readonly seed: number;
  /** Applied to every attention row set before solving (e.g. the what-if cap). */
  readonly transform?: (rows: AttentionRows) => AttentionRows;
  /** Where the draws run when there is no transform (issue 12); default here. */
  readonly drawRanges?: DrawRangeRunner;
  /** Where the prior's strength posterior of the rows runs (the CLI: shared with the pool). */
  readonly strengthRows?: StrengthRowsRunner;
  /** Called with the number of draws done, about 50 times per analysis. */
  readonly onDraw?: (done: number) => void;
  /** Member → group whose attention profile is the member's prior (default: one group). */
  readonly groupOf?: Int32Array;
}

export interface InfluenceResult {
  /** Point attention rows (after any transform). */
  readonly rows: AttentionRows;
  /** Stationary vector s of the point estimate. */
  readonly shares: Float64Array;
  /** One share vector per posterior draw. */
  readonly draws: readonly Float64Array[];
  /** 1/Σs² per draw. */
  readonly effectiveVoicesDraws: Float64Array;
  /** |λ2| of the point T. */
  readonly secondEigenvalue: number;
  /** Median prior strength α over rows (`settings.priorStrength`). */
  readonly priorStrength: number;
  /** How the prior part of each row is drawn (`settings.posterior`). */
  readonly posterior: "exact" | "pooled";
}

/** 1 / Σ s_i²: Kish's effective sample size of the consensus (DESIGN.md §1, effective voices). */
export function effectiveVoicesOf(shares: ArrayLike<number>): number {
  let sum = 0;
  for (let i = 0; i < shares.length; i++) sum += shares[i] * shares[i];
  return sum > 0 ? 1 / sum : 0;
}

/** Draws [0, samples) in this thread; in about 50 ranges when progress is asked for. */
function drawHere(
  plan: DrawPlan,
  samples: number,
  transform: InfluenceOptions["transform"],
  onDraw: InfluenceOptions["onDraw"],
): DrawRange {
  if (onDraw === undefined) return drawShares(plan, 0, samples, transform);
  const n = plan.n;
  const shares = new Float64Array(samples * n);
  const effectiveVoices = new Float64Array(samples);
  const step = Math.max(1, Math.ceil(samples / 50));
  for (let from = 0; from < samples; from += step) {
    const to = Math.min(samples, from + step);
    const range = drawShares(plan, from, to, transform); // ranges concatenate to [0, samples)
    shares.set(range.shares, from * n);
    effectiveVoices.set(range.effectiveVoices, from);
    onDraw(to);
  }
  return { shares, effectiveVoices };
}

export function analyzeInfluence(counts: CountMatrix, options: InfluenceOptions): InfluenceResult {
  const prior = buildAttentionPrior(
    counts,
    options.background,
    options.groupOf,
    options.strengthRows,
  );
  const rows0 = pointRowsFromPrior(counts, prior);
  const rows = options.transform ? options.transform(rows0) : rows0;
  const point = stationaryVector(rows, { selfWeight: options.selfWeight }).vector;
  const plan = drawPlan(counts, prior, {
    selfWeight: options.selfWeight,
    seed: options.seed,
    start: point,
  });
  // |λ2| needs only the point rows: while workers make the draws, the calling thread computes it.
  let lambda2: number | null = null;
  const computeLambda2 = (): void => {
    lambda2 ??= secondEigenvalue(rows, options.selfWeight, point);
  };
  const range =
    (options.transform === undefined
      ? options.drawRanges?.(plan, options.samples, computeLambda2)
      : null) ?? drawHere(plan, options.samples, options.transform, options.onDraw);
  computeLambda2();
  const n = prior.n;
  const draws: Float64Array[] = [];
  for (let k = 0; k < options.samples; k++) draws.push(range.shares.subarray(k * n, (k + 1) * n));
  return {
    rows,
    shares: point,
    draws,
    effectiveVoicesDraws: range.effectiveVoices,
    secondEigenvalue: lambda2 ?? secondEigenvalue(rows, options.selfWeight, point),
    priorStrength: prior.priorStrength,
    posterior: posteriorMethod(n),
  };
}
