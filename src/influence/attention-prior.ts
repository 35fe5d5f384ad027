/**
 * @module attention-prior
 * The prior of DESIGN.md §4.4 (version 2). Row i's attention has the prior Dirichlet(α_i·m^(i)):
 * m is the channel's attention profile (attention received), m^(i) is m without entry i,
 * renormalised, and α_i is the prior strength in signals.
 *
 * - Effective counts (§4.3): Ĉ_ij = k_i·C_ij with k_i = Σw/Σw² (Kish 1965, "Survey Sampling").
 * - The profile m: member j receives x_j = Σ_i d_i·Ĉ_ij signals, where a row's ĉ_i signals are
 *   worth d_i = min(1, (1+α_i)/(ĉ_i+α_i)) independent draws of the profile — the variance
 *   inflation of a Dirichlet–multinomial count (Mosimann 1962, "On the compound multinomial
 *   distribution…", Biometrika 49:65–82). How popular a typical member is, is learnt from the x
 *   (`fitPopularity`: a Gamma–Poisson hierarchy with a hub component), so a member nobody has
 *   answered yet is assumed as popular as the channel's typical member is, no more and no less, and
 *   a member everyone attends to keeps the attention the data give them. The draws take a fresh m
 *   from its posterior each time, so the profile's own uncertainty is in the intervals.
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
  /** Grid of the popularity shape β (log-spaced). */
  popularityGridPoints: 61,
  popularityGridLow: 0.01,
  popularityGridHigh: 1000,
  /** Prior share w of hubs, members attended to beyond the typical spread. */
  hubShare: 0.05,
  /** A hub's rate is log-uniform on [μ, hubRange·μ]. */
  hubRange: 1000,
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
  /** Hub columns of the one-group profile (absent with several groups). */
  readonly hubs?: ProfileHubs;
  /** The fitted popularity hyperprior (channel-wide). */
  readonly popularity: Popularity;
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

/** Received signals x_j = Σ_i d_i·Ĉ_ij per group (groups × n) and channel-wide (n). */
function receivedCounts(
  counts: CountMatrix,
  effective: Float64Array,
  rowTotals: Float64Array,
  strength: Float64Array,
  groupOf: Int32Array,
  groups: number,
): { readonly own: Float64Array; readonly channel: Float64Array } {
  const n = counts.members.length;
  const own = new Float64Array(groups * n);
  const channel = new Float64Array(n);
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
  return { own, channel };
}

/** How popular a typical member is (DESIGN.md §4.4 v2): the fitted hyperprior of the profile. */
export interface Popularity {
  /** Gamma shape β of a typical member's attention rate (small = uneven channel). */
  readonly shape: number;
  /** Mean μ of a typical member's rate, in received signals. */
  readonly mean: number;
  /** Posterior probability that member j is a hub (outside the typical spread). */
  readonly hubProbability: Float64Array;
}

/**
 * log P(x) of the negative binomial with shape r and mean μ (the Gamma–Poisson marginal, r and x
 * real ≥ 0): lnΓ(x+r) − lnΓ(r) − lnΓ(x+1) + r·ln(r/(r+μ)) + x·ln(μ/(r+μ)).
 */
export function logNegativeBinomial(x: number, r: number, mean: number): number {
  const logTotal = Math.log(r + mean);
  return (
    logGamma(x + r) -
    logGamma(r) -
    logGamma(x + 1) +
    r * (Math.log(r) - logTotal) +
    (x > 0 ? x * (Math.log(mean) - logTotal) : 0)
  );
}

const HUB_NODES = 48;

/**
 * log P(x) when the rate λ is log-uniform on [μ, R·μ] (the hub component), the Poisson probability
 * averaged over ln λ by the trapezoid rule on HUB_NODES nodes (log-sum-exp), for one mean μ and
 * many x: ln λ_t, λ_t and the trapezoid weights' logs depend on μ
 * only, so `fitPopularity` computes them once per pass instead of once per member (the same
 * operations in the same order as computing them inside, so the same numbers).
 */
function hubNodes(mean: number, range: number) {
  const a = Math.log(mean);
  const h = Math.log(range) / (HUB_NODES - 1);
  const logRates = new Float64Array(HUB_NODES);
  const rates = new Float64Array(HUB_NODES);
  const logWeights = new Float64Array(HUB_NODES);
  for (let t = 0; t < HUB_NODES; t++) {
    logRates[t] = a + t * h;
    rates[t] = Math.exp(logRates[t]);
    logWeights[t] = Math.log(t === 0 || t === HUB_NODES - 1 ? 0.5 : 1);
  }
  const logs = new Float64Array(HUB_NODES);
  return {
    /** The marginal at x, given lnΓ(x + 1). */
    marginal(x: number, constant: number): number {
      let max = Number.NEGATIVE_INFINITY;
      for (let t = 0; t < HUB_NODES; t++) {
        logs[t] = x * logRates[t] - rates[t] - constant + logWeights[t];
        if (logs[t] > max) max = logs[t];
      }
      let sum = 0;
      for (let t = 0; t < HUB_NODES; t++) sum += Math.exp(logs[t] - max);
      return max + Math.log(sum / (HUB_NODES - 1));
    },
  };
}

/**
 * `logNegativeBinomial` over many x at one shape r and mean μ: lnΓ(r), r·ln(r/(r+μ)) and
 * ln(μ/(r+μ)) once, lnΓ(x+1) given by the caller (`logFactorial`), so one lnΓ per member
 * remains. The same operations in the same order as `logNegativeBinomial`, so the same numbers.
 */
export function negativeBinomialAt(r: number, mean: number) {
  const logTotal = Math.log(r + mean);
  const logGammaR = logGamma(r);
  const shapeTerm = r * (Math.log(r) - logTotal);
  const countFactor = Math.log(mean) - logTotal;
  return (x: number, logFactorial: number): number =>
    // x = 0: x + r is r, so lnΓ(x + r) is lnΓ(r).
    (x === 0 ? logGammaR : logGamma(x + r)) -
    logGammaR -
    logFactorial +
    shapeTerm +
    (x > 0 ? x * countFactor : 0);
}

/**
 * Fits how popular a typical member is from the received signals x (DESIGN.md §4.4 v2): each
 * member's rate λ_j is, with probability 1 − w, Gamma(β) with mean μ (a typical member), else
 * log-uniform on [μ, R·μ] (a hub), and x_j ~ Poisson(λ_j). β is the maximum of the expected
 * complete-data likelihood on a log grid, μ the mean of the typical members' counts, alternated
 * with the hub probabilities (EM; Dempster, Laird & Rubin 1977, JRSS B 39:1–38) until they settle.
 * The hub component keeps a member everyone attends to from being shrunk toward the crowd; the
 * learnt β decides how far the rest are.
 */
export function fitPopularity(x: ArrayLike<number>): Popularity {
  const n = x.length;
  const {
    popularityGridPoints: G,
    popularityGridLow,
    popularityGridHigh,
    hubShare,
    hubRange,
  } = PRIOR_DEFAULTS;
  const hubProbability = new Float64Array(n);
  let total = 0;
  for (let j = 0; j < n; j++) total += x[j];
  if (!(total > 0) || n === 0) return { shape: popularityGridHigh, mean: 1, hubProbability };
  const grid = logGrid(popularityGridLow, popularityGridHigh, G);
  // lnΓ(x_j + 1) is the same at every pass and grid point.
  const logFactorial = new Float64Array(n);
  for (let j = 0; j < n; j++) logFactorial[j] = logGamma(x[j] + 1);
  const logHub = Math.log(hubShare);
  const logTypical = Math.log(1 - hubShare);
  let mean = total / n;
  let shape = 1;
  for (let pass = 0; pass < 20; pass++) {
    const hubAt = hubNodes(mean, hubRange);
    const typicalAt = negativeBinomialAt(shape, mean);
    for (let j = 0; j < n; j++) {
      if (!(x[j] > 0)) {
        hubProbability[j] = 0;
        continue;
      }
      const hub = logHub + hubAt.marginal(x[j], logFactorial[j]);
      const typical = logTypical + typicalAt(x[j], logFactorial[j]);
      hubProbability[j] = 1 / (1 + Math.exp(typical - hub));
    }
    let weight = 0;
    let sum = 0;
    for (let j = 0; j < n; j++) {
      weight += 1 - hubProbability[j];
      sum += (1 - hubProbability[j]) * x[j];
    }
    const nextMean = weight > 0 && sum > 0 ? sum / weight : mean;
    let best = Number.NEGATIVE_INFINITY;
    let nextShape = shape;
    for (let g = 0; g < G; g++) {
      const at = negativeBinomialAt(grid[g], nextMean);
      let log = 0;
      for (let j = 0; j < n; j++) {
        log += (1 - hubProbability[j]) * at(x[j], logFactorial[j]);
      }
      if (log > best) {
        best = log;
        nextShape = grid[g];
      }
    }
    const settled = nextShape === shape && Math.abs(nextMean - mean) <= 1e-9 * mean;
    shape = nextShape;
    mean = nextMean;
    if (settled) break;
  }
  return { shape, mean, hubProbability };
}

function logGrid(low: number, high: number, points: number): Float64Array {
  const grid = new Float64Array(points);
  const a = Math.log(low);
  const b = Math.log(high);
  for (let g = 0; g < points; g++) grid[g] = Math.exp(a + ((b - a) * g) / (points - 1));
  return grid;
}

/** The profile's posterior (DESIGN.md §4.4 v2) for the current design effects. */
interface ProfilePosterior {
  /** Gamma shapes (groups × n) of the typical-member posterior; normalised they are Dirichlet. */
  readonly concentration: Float64Array;
  /** Posterior means of the profiles (groups × n, each block sums to 1). */
  readonly profile: Float64Array;
  /** Channel-wide hubs (one group only). */
  readonly hubs?: ProfileHubs;
  readonly popularity: Popularity;
}

/**
 * Hub columns of the one-group profile: with probability p_j member j's rate is Gamma(x_j, 1)
 * (the hub posterior, its bounds dropped), else Gamma(x_j + β)/rate with rate = 1 + β/μ.
 */
export interface ProfileHubs {
  readonly probability: Float64Array;
  readonly shape: Float64Array;
  readonly rate: number;
}

/**
 * One group: λ_j | x_j is Gamma(x_j + β, 1 + β/μ) for a typical member and ≈ Gamma(x_j, 1) for a
 * hub, mixed by the hub probability; the profile is λ normalised. Several groups: group g's
 * profile is Dirichlet(x_g + b_g·u), u the channel-wide profile mean and b_g the geometric
 * posterior mean of its Dirichlet–multinomial likelihood on a log grid (log-uniform prior).
 */
function profilePosterior(
  received: { readonly own: Float64Array; readonly channel: Float64Array },
  n: number,
  groups: number,
): ProfilePosterior {
  const { channel, own } = received;
  const popularity = fitPopularity(channel);
  const { shape, mean, hubProbability } = popularity;
  const rate = 1 + shape / mean;
  const concentration = new Float64Array(groups * n);
  const u = new Float64Array(n);
  let sum = 0;
  for (let j = 0; j < n; j++) {
    concentration[j] = channel[j] + shape;
    const p = hubProbability[j];
    u[j] = ((1 - p) * (channel[j] + shape)) / rate + p * channel[j];
    sum += u[j];
  }
  for (let j = 0; j < n; j++) u[j] = sum > 0 ? u[j] / sum : 1 / n;
  if (groups === 1) {
    const hubShape = Float64Array.from(channel);
    return {
      concentration,
      profile: u,
      hubs: { probability: hubProbability, shape: hubShape, rate },
      popularity,
    };
  }
  const { popularityGridPoints: G, popularityGridLow, popularityGridHigh } = PRIOR_DEFAULTS;
  const grid = logGrid(popularityGridLow * n, popularityGridHigh * n, G);
  const logs = new Float64Array(G);
  const a = new Float64Array(n);
  for (let g = 0; g < groups; g++) {
    const x = own.subarray(g * n, (g + 1) * n);
    let max = Number.NEGATIVE_INFINITY;
    for (let t = 0; t < G; t++) {
      for (let j = 0; j < n; j++) a[j] = grid[t] * u[j];
      logs[t] = logDirichletMultinomial(x, a);
      if (logs[t] > max) max = logs[t];
    }
    let weight = 0;
    let logMean = 0;
    for (let t = 0; t < G; t++) {
      const w = Math.exp(logs[t] - max);
      weight += w;
      logMean += w * Math.log(grid[t]);
    }
    const b = Math.exp(logMean / weight);
    for (let j = 0; j < n; j++) concentration[g * n + j] = x[j] + b * u[j];
  }
  return { concentration, profile: normalisedBlocks(concentration, n), popularity };
}

/**
 * log of the Dirichlet–multinomial (Pólya) probability of counts x under Dirichlet(a), without the
 * multinomial coefficient: ln Γ(A) − ln Γ(N + A) + Σ_j [ln Γ(x_j + a_j) − ln Γ(a_j)], A = Σa,
 * N = Σx (Minka 2000, "Estimating a Dirichlet distribution", the Pólya likelihood). Cells with
 * x_j = 0 contribute 0. Non-integer x (effective counts) are allowed.
 */
export function logDirichletMultinomial(x: ArrayLike<number>, a: ArrayLike<number>): number {
  let total = 0;
  let strength = 0;
  let cells = 0;
  for (let j = 0; j < x.length; j++) {
    total += x[j];
    strength += a[j];
    if (x[j] > 0) cells += logGamma(x[j] + a[j]) - logGamma(a[j]);
  }
  return logGamma(strength) - logGamma(total + strength) + cells;
}

/**
 * Log Dirichlet–multinomial likelihood of row i's effective counts under Dirichlet(α·m^(i)),
 * without the multinomial coefficient (it does not depend on α). Unobserved cells cancel.
 */
function rowLogLikelihood(
  rowPtr: Int32Array,
  colIdx: Int32Array,
  effective: Float64Array,
  i: number,
  total: number,
  alpha: number,
  logGammaAlpha: number,
  profile: Float64Array,
  base: number,
): number {
  const scale = alpha / (1 - profile[base + i]);
  let sum = logGammaAlpha - logGamma(total + alpha);
  for (let k = rowPtr[i]; k < rowPtr[i + 1]; k++) {
    const a = scale * profile[base + colIdx[k]];
    sum += logGamma(effective[k] + a) - logGamma(a);
  }
  return sum;
}

/**
 * What the strength posterior of the rows needs in one pass (typed arrays only, so it crosses to
 * worker threads): the rows' effective counts and totals, the strength grid with lnΓ(α) and ln α
 * of each point, and each group's profile.
 */
export interface StrengthRowsTask {
  readonly n: number;
  readonly rowPtr: Int32Array;
  readonly colIdx: Int32Array;
  readonly effective: Float64Array;
  readonly rowTotals: Float64Array;
  readonly grid: Float64Array;
  readonly logGammaGrid: Float64Array;
  readonly logOfGrid: Float64Array;
  readonly profile: Float64Array;
  readonly profileOf: Int32Array;
}

/**
 * Computes every row of `task` into `cumulative` (n × grid) and `strength` (n) elsewhere (the
 * CLI: over the worker pool, by `strengthRows` on ranges of rows, so the same numbers); false
 * when it cannot, and the rows are computed here.
 */
export type StrengthRowsRunner = (
  task: StrengthRowsTask,
  cumulative: Float64Array,
  strength: Float64Array,
) => boolean;

/**
 * Rows [from, to) of one pass: each row's posterior over the strength grid (its Pólya likelihood
 * at every grid point, log-sum-exp), as cumulative weights at `cumulative[i·G + g]`, and α_i, its
 * geometric posterior mean, at `strength[i]`. Rows are independent, so ranges can be computed
 * anywhere in any order with the same result.
 */
export function strengthRows(
  task: StrengthRowsTask,
  from: number,
  to: number,
  cumulative: Float64Array,
  strength: Float64Array,
): void {
  const { n, rowPtr, colIdx, effective, rowTotals, grid, logGammaGrid, logOfGrid, profile } = task;
  const G = grid.length;
  const logs = new Float64Array(G);
  for (let i = from; i < to; i++) {
    const base = task.profileOf[i] * n;
    let max = Number.NEGATIVE_INFINITY;
    for (let g = 0; g < G; g++) {
      // A silent row's likelihood is flat: its posterior is the grid prior.
      const log =
        rowTotals[i] > 0
          ? rowLogLikelihood(
              rowPtr,
              colIdx,
              effective,
              i,
              rowTotals[i],
              grid[g],
              logGammaGrid[g],
              profile,
              base,
            )
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
      logMean += w * logOfGrid[g];
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

/**
 * Builds the prior of DESIGN.md §4.4 for `counts`. `groupOf` (member → group index, groups
 * numbered from 0) gives each row the profile of attention its own group gives; absent = one
 * channel-wide profile.
 */
export function buildAttentionPrior(
  counts: CountMatrix,
  background: Background,
  groupOf?: Int32Array,
  strengthRowsElsewhere?: StrengthRowsRunner,
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
  let posterior: ProfilePosterior | null = null;
  const passes = G === 1 ? 1 : PRIOR_DEFAULTS.passes;
  // lnΓ(α) and ln α of each grid point, the same for every row.
  const logGammaGrid = G === 1 ? new Float64Array(1) : grid.map(logGamma);
  const logOfGrid = grid.map(Math.log);
  for (let pass = 0; pass < passes; pass++) {
    posterior = profilePosterior(
      receivedCounts(counts, effective, rowTotals, strength, groupIndex, groups),
      n,
      groups,
    );
    if (G === 1) {
      cumulative.fill(1);
      continue;
    }
    const task: StrengthRowsTask = {
      n,
      rowPtr: counts.rowPtr,
      colIdx: counts.colIdx,
      effective,
      rowTotals,
      grid,
      logGammaGrid,
      logOfGrid,
      profile: posterior.profile,
      profileOf: groupIndex,
    };
    if (!(strengthRowsElsewhere?.(task, cumulative, strength) ?? false)) {
      strengthRows(task, 0, n, cumulative, strength);
    }
  }
  if (posterior === null) throw new Error("unreachable: no prior pass ran");
  return {
    n,
    effective,
    rowTotals,
    concentration: posterior.concentration,
    profile: posterior.profile,
    ...(posterior.hubs ? { hubs: posterior.hubs } : {}),
    popularity: posterior.popularity,
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
