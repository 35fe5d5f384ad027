/**
 * @module attention-prior
 * The prior of DESIGN.md §4.4 (version 2). Row i's attention has the prior Dirichlet(α_i·m^(i)):
 * m is the channel's attention profile (attention received), m^(i) is m without entry i,
 * renormalised, and α_i is the prior strength in signals.
 *
 * - Effective counts (§4.3): Ĉ_ij = k_i·C_ij with k_i = Σw/Σw² (Kish 1965, "Survey Sampling").
 * - The profile m has the posterior Dirichlet(a₀/n + Σ_i d_i·Ĉ_i·): a row's ĉ_i signals are worth
 *   d_i = min(1, (1+α_i)/(ĉ_i+α_i)) independent draws of the profile — the variance inflation of a
 *   Dirichlet–multinomial count (Mosimann 1962, "On the compound multinomial distribution…",
 *   Biometrika 49:65–82) — and a₀ = 0.3 per member smooths members nobody attended to yet. The
 *   draws take a fresh m from this posterior each time, so the profile's own uncertainty is in the
 *   intervals.
 * - Prior strength `auto` (the default, chosen by the calibration search in
 *   bench/calibrate/prototype/): α_i is learnt per row. Its posterior on a log-spaced grid of
 *   GRID_POINTS values in [0.1, 10·(n−1)] is the Dirichlet–multinomial likelihood of the row's
 *   effective counts under Dirichlet(α·m^(i)) (Minka 2000, "Estimating a Dirichlet distribution",
 *   eq. for the Pólya likelihood) times a log-uniform prior on the grid; the draws take α_i from
 *   this posterior, the point estimate uses its geometric mean. A row with few signals thus keeps
 *   both possibilities open — attention spread like the channel's or held by a few — and a silent
 *   row is drawn from the prior alone.
 * - A fixed `background` α ≥ 0 uses α_i = α for every row (0 = no prior: silent rows follow m).
 */

import type { CountMatrix } from "../domain/counts.js";
import { PlumblineError } from "../domain/errors.js";
import type { AttentionRows } from "./attention-rows.js";
import { logGamma } from "./log-gamma.js";

/** `background` of DESIGN.md §4: "auto" (learnt per row) or a fixed strength α ≥ 0. */
export type Background = number | "auto";

export const PRIOR_DEFAULTS = {
  /** Hyperprior a₀ per member on the profile m. */
  profileSmoothingPerMember: 1,
  gridPoints: 25,
  gridLow: 0.1,
  /** Grid top = gridHighPerMember·(n − 1): no row is assumed more even than Dirichlet(1). */
  gridHighPerMember: 1,
  /** Profile ↔ strength passes (the design effect depends on α, α's likelihood on m). */
  passes: 2,
} as const;

export interface AttentionPrior {
  readonly n: number;
  /** Ĉ_ij per stored entry (same structure as the counts). */
  readonly effective: Float64Array;
  /** ĉ_i = Σ_j Ĉ_ij. */
  readonly rowTotals: Float64Array;
  /** Dirichlet posterior parameters of each group's profile (groups × n). */
  readonly concentration: Float64Array;
  /** Posterior means of the profiles (groups × n, each block sums to 1). */
  readonly profile: Float64Array;
  /** Each row's group (its profile's index). */
  readonly profileOf: Int32Array;
  /** Strength grid (one value when fixed). */
  readonly grid: Float64Array;
  /** Per row, cumulative posterior weights over the grid (n × grid.length, each row ends at 1). */
  readonly cumulative: Float64Array;
  /** α_i of the point estimate (geometric posterior mean when learnt). */
  readonly strength: Float64Array;
  /** Median of `strength`: the report's `settings.priorStrength`. */
  readonly priorStrength: number;
}

/** Guards the background setting of DESIGN.md §4. */
export function checkBackground(background: Background): void {
  if (background === "auto") return;
  if (typeof background !== "number" || !Number.isFinite(background) || background < 0) {
    throw new PlumblineError(
      "SETTING_BAD_VALUE",
      `background must be "auto" or a number of at least 0, got ${String(background)}: set --background to auto (default) or a prior strength such as 2`,
      { hint: "Set --background to auto (default) or a number of 0 or more, such as 2." },
    );
  }
}

/** Ĉ = k_i·C_ij per stored entry (DESIGN.md §4.3); the counts themselves when there is no decay. */
export function effectiveCounts(counts: CountMatrix): Float64Array {
  const { rowPtr, values, kish } = counts;
  if (!kish) return values;
  const out = new Float64Array(values.length);
  const n = counts.members.length;
  for (let i = 0; i < n; i++) {
    for (let k = rowPtr[i]; k < rowPtr[i + 1]; k++) out[k] = kish[i] * values[k];
  }
  return out;
}

function strengthGrid(n: number, background: Background): Float64Array {
  if (background !== "auto") return Float64Array.of(background);
  const { gridPoints, gridLow, gridHighPerMember } = PRIOR_DEFAULTS;
  const high = Math.max(1, gridHighPerMember * (n - 1));
  const grid = new Float64Array(gridPoints);
  const a = Math.log(gridLow);
  const b = Math.log(high);
  for (let g = 0; g < gridPoints; g++) grid[g] = Math.exp(a + ((b - a) * g) / (gridPoints - 1));
  return grid;
}

/**
 * Dirichlet parameters of each group's profile (groups × n): the group's rows' counts weighted by
 * the design effect d_i, plus a₀ = `profileSmoothingPerMember`·n pseudo-signals spread like the
 * channel-wide profile (itself smoothed by a₀ per member).
 */
function profileConcentrations(
  counts: CountMatrix,
  effective: Float64Array,
  rowTotals: Float64Array,
  strength: Float64Array,
  groupOf: Int32Array,
  groups: number,
): Float64Array {
  const n = counts.members.length;
  const a0 = PRIOR_DEFAULTS.profileSmoothingPerMember;
  const own = new Float64Array(groups * n);
  const channel = new Float64Array(n).fill(a0);
  for (let i = 0; i < n; i++) {
    const c = rowTotals[i];
    if (!(c > 0)) continue;
    const a = strength[i];
    const d = Math.min(1, (1 + a) / (c + a));
    const base = groupOf[i] * n;
    for (let k = counts.rowPtr[i]; k < counts.rowPtr[i + 1]; k++) {
      const w = d * effective[k];
      own[base + counts.colIdx[k]] += w;
      channel[counts.colIdx[k]] += w;
    }
  }
  let total = 0;
  for (let j = 0; j < n; j++) total += channel[j];
  const spread = (a0 * n) / total;
  for (let g = 0; g < groups; g++) {
    for (let j = 0; j < n; j++) own[g * n + j] += spread * channel[j];
  }
  return own;
}

/**
 * Log Dirichlet–multinomial likelihood of row i's effective counts under Dirichlet(α·m^(i)),
 * without the multinomial coefficient (it does not depend on α). Unobserved cells cancel.
 */
function rowLogLikelihood(
  counts: CountMatrix,
  effective: Float64Array,
  i: number,
  total: number,
  alpha: number,
  profile: Float64Array,
  base: number,
): number {
  const scale = alpha / (1 - profile[base + i]);
  let sum = logGamma(alpha) - logGamma(total + alpha);
  for (let k = counts.rowPtr[i]; k < counts.rowPtr[i + 1]; k++) {
    const a = scale * profile[base + counts.colIdx[k]];
    sum += logGamma(effective[k] + a) - logGamma(a);
  }
  return sum;
}

/**
 * Builds the prior of DESIGN.md §4.4 for `counts`. `groupOf` (member → group index, groups
 * numbered from 0) gives each row the profile of attention its own group gives; absent = one
 * channel-wide profile.
 */
export function buildAttentionPrior(
  counts: CountMatrix,
  background: Background,
  groupOf?: Int32Array,
): AttentionPrior {
  checkBackground(background);
  const n = counts.members.length;
  const groupIndex = groupOf ?? new Int32Array(n);
  if (groupIndex.length !== n)
    throw new RangeError(`groupOf has ${groupIndex.length} entries, expected ${n}`);
  let groups = 1;
  for (let i = 0; i < n; i++) groups = Math.max(groups, groupIndex[i] + 1);
  const effective = effectiveCounts(counts);
  const rowTotals = new Float64Array(n);
  for (let i = 0; i < n; i++) {
    let c = 0;
    for (let k = counts.rowPtr[i]; k < counts.rowPtr[i + 1]; k++) c += effective[k];
    rowTotals[i] = c;
  }
  const grid = strengthGrid(n, background);
  const G = grid.length;
  const cumulative = new Float64Array(n * G);
  const strength = new Float64Array(n);
  strength.fill(G === 1 ? grid[0] : Math.sqrt(grid[0] * grid[G - 1]));
  let concentration: Float64Array = new Float64Array(0);
  let profile: Float64Array = new Float64Array(0);
  const passes = G === 1 ? 1 : PRIOR_DEFAULTS.passes;
  const logs = new Float64Array(G);
  for (let pass = 0; pass < passes; pass++) {
    concentration = profileConcentrations(
      counts,
      effective,
      rowTotals,
      strength,
      groupIndex,
      groups,
    );
    profile = normalisedBlocks(concentration, n);
    for (let i = 0; i < n; i++) {
      if (G === 1) {
        cumulative[i] = 1;
        continue;
      }
      const base = groupIndex[i] * n;
      let max = Number.NEGATIVE_INFINITY;
      for (let g = 0; g < G; g++) {
        // A silent row's likelihood is flat: its posterior is the grid prior.
        const log =
          rowTotals[i] > 0
            ? rowLogLikelihood(counts, effective, i, rowTotals[i], grid[g], profile, base)
            : 0;
        logs[g] = log;
        if (log > max) max = log;
      }
      let total = 0;
      let logMean = 0;
      for (let g = 0; g < G; g++) {
        const w = Math.exp(logs[g] - max);
        logs[g] = w;
        total += w;
        logMean += w * Math.log(grid[g]);
      }
      let running = 0;
      for (let g = 0; g < G; g++) {
        running += logs[g] / total;
        cumulative[i * G + g] = running;
      }
      cumulative[i * G + G - 1] = 1;
      strength[i] = Math.exp(logMean / total);
    }
  }
  return {
    n,
    effective,
    rowTotals,
    concentration,
    profile,
    profileOf: groupIndex,
    grid,
    cumulative,
    strength,
    priorStrength: median(strength),
  };
}

function normalisedBlocks(x: Float64Array, n: number): Float64Array {
  const out = new Float64Array(x.length);
  for (let base = 0; base < x.length; base += n) {
    let sum = 0;
    for (let j = 0; j < n; j++) sum += x[base + j];
    for (let j = 0; j < n; j++) out[base + j] = sum > 0 ? x[base + j] / sum : 1 / n;
  }
  return out;
}

function median(x: Float64Array): number {
  if (x.length === 0) return 0;
  const sorted = Float64Array.from(x).sort();
  const h = (sorted.length - 1) / 2;
  return (sorted[Math.floor(h)] + sorted[Math.ceil(h)]) / 2;
}

/**
 * The point estimate of DESIGN.md §4.4: A_ij = (Ĉ_ij + α_i·m^(i)_j)/(ĉ_i + α_i), A_ii = 0; a row
 * with no signals (or α_i = 0 and no signals) is m^(i). Stored as entries plus a rest along m.
 * The structure arrays are shared with `counts`.
 */
export function pointRowsFromPrior(counts: CountMatrix, prior: AttentionPrior): AttentionRows {
  const n = prior.n;
  const { rowPtr, colIdx } = counts;
  const values = new Float64Array(counts.values.length);
  const rest = new Float64Array(n);
  const { profile, profileOf } = prior;
  if (n < 2) return { n, rowPtr, colIdx, values, rest };
  for (let i = 0; i < n; i++) {
    const total = prior.rowTotals[i];
    const alpha = prior.strength[i];
    const off = 1 - profile[profileOf[i] * n + i];
    if (!(total > 0)) {
      rest[i] = 1 / off;
      continue;
    }
    const denominator = total + alpha;
    for (let k = rowPtr[i]; k < rowPtr[i + 1]; k++) values[k] = prior.effective[k] / denominator;
    rest[i] = alpha / denominator / off;
  }
  return { n, rowPtr, colIdx, values, rest, profile, profileOf };
}
