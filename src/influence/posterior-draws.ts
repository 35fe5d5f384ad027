/**
 * @module posterior-draws
 * Posterior draws of the influence shares (DESIGN.md §4.6, version 2). Each draw k, on its own
 * random stream `createDrawRng(seed, k)`:
 *
 * 1. takes each group's profile m from its posterior (attention-prior), as normalised Gamma
 *    variates (a hub column from its hub posterior with its hub probability);
 * 2. takes each row's prior strength α_i from its grid posterior (one uniform per row);
 * 3. draws every cell of every row from Dirichlet(Ĉ_i + α_i·m^(i)) (Noé 2008, "Probability
 *    distributions of molecular observables computed from Markov models", J. Chem. Phys.
 *    128:244103, for the row-wise Dirichlet posterior of a transition matrix). By the additivity of
 *    Gamma variates, Gamma(Ĉ_ij + α m_j) = Gamma(Ĉ_ij) + Gamma(α m_j), so a row is its observed
 *    cells' Gamma(Ĉ_ij) plus a prior part Gamma(α)·W with W ~ Dirichlet(α·m^(i)) over all the
 *    others. Up to EXACT_MEMBERS members (`settings.posterior` "exact") W is drawn per cell
 *    (normalised Gamma variates: the reference). Above ("pooled"), a row whose α is small draws W
 *    by Sethuraman's stick-breaking (Sethuraman 1994, "A constructive definition of Dirichlet
 *    priors", Statistica Sinica 4:639–650): weights V_t·Π_{u<t}(1−V_u), V ~ Beta(1, α), atoms
 *    from m^(i) — exact in law; sticks stop when less than STICK_REMAINDER of the prior part is
 *    left, and that remainder follows the rest profile. A row whose α·ln(1/STICK_REMAINDER) ≥ n−1
 *    (sticks would cost more than n cells) takes its group's pooled direction W_g instead
 *    (`drawPooled`), an approximation that keeps the covariance the shares feel to first order and
 *    costs O(n) per group per draw instead of O(n) per row; test/influence/pooled-draws.test.ts
 *    compares it with the exact draws and the calibration suite checks it at n = 200 and 1,000;
 * 4. solves sT = s, warm-started from the point estimate, to DRAW_TOLERANCE.
 *
 * `drawShares` computes draws [from, to) from plain typed arrays and options only, so any range
 * can run anywhere (e.g. a worker thread) and the concatenation is the same for any split.
 */

import type { CountMatrix } from "../domain/counts.js";
import { createDrawRng } from "../ports/rng.js";
import {
  type AttentionPrior,
  type Background,
  buildAttentionPrior,
  type ProfileHubs,
} from "./attention-prior.js";
import type { AttentionRows } from "./attention-rows.js";
import {
  createGammaSampler,
  type GammaConstants,
  type GammaSampler,
  gammaConstants,
  LINEAR_MIN_SHAPE,
} from "./gamma-sampler.js";
import { checkSelfWeight, stationaryVector } from "./stationary-vector.js";

/** Channels up to this many members draw every cell per draw (`settings.posterior` = "exact"). */
export const EXACT_MEMBERS = 64;
/** Stick-breaking stops when this share of a row's prior part is left (it follows m^(i)). */
export const STICK_REMAINDER = 1e-6;
/**
 * Draws are solved to 1e-9 in L1 (the point estimate to 1e-12, DESIGN.md §4.5): far below the
 * Monte Carlo error of the interval ends, which are reported to 6 decimals.
 */
export const DRAW_TOLERANCE = 1e-9;

/** Everything a range of draws needs: typed arrays and numbers only. */
export interface DrawPlan {
  readonly n: number;
  readonly rowPtr: Int32Array;
  readonly colIdx: Int32Array;
  /** Effective counts Ĉ per stored entry. */
  readonly effective: Float64Array;
  /** Dirichlet posterior parameters of each group's profile (groups × n). */
  readonly concentration: Float64Array;
  /** Hub columns of a one-group profile (attention-prior's `ProfileHubs`). */
  readonly hubs?: ProfileHubs;
  /** Each row's group: the profile its prior follows. */
  readonly profileOf: Int32Array;
  readonly grid: Float64Array;
  /** n × grid.length cumulative weights of each row's prior strength. */
  readonly cumulative: Float64Array;
  readonly selfWeight: number;
  readonly seed: number;
  /** Warm start of every solve (the point estimate's shares). */
  readonly start: Float64Array;
  /** Draw every cell whatever n (the reference the pooled draws are checked against). */
  readonly forceExact?: boolean;
}

export interface DrawRange {
  /** (to − from) × n shares, draw by draw. */
  readonly shares: Float64Array;
  /** 1/Σs² per draw. */
  readonly effectiveVoices: Float64Array;
}

/** `settings.posterior`: how each row's prior part is drawn. */
export function posteriorMethod(n: number): "exact" | "pooled" {
  return n <= EXACT_MEMBERS ? "exact" : "pooled";
}

export function drawPlan(
  counts: CountMatrix,
  prior: AttentionPrior,
  options: { selfWeight: number; seed: number; start: Float64Array },
): DrawPlan {
  return {
    n: prior.n,
    rowPtr: counts.rowPtr,
    colIdx: counts.colIdx,
    effective: prior.effective,
    concentration: prior.concentration,
    ...(prior.hubs ? { hubs: prior.hubs } : {}),
    profileOf: prior.profileOf,
    grid: prior.grid,
    cumulative: prior.cumulative,
    selfWeight: options.selfWeight,
    seed: options.seed,
    start: options.start,
  };
}

/** Growable storage for one drawn matrix (rows of variable length). */
class RowBuilder {
  cols: Int32Array;
  vals: Float64Array;
  readonly rowPtr: Int32Array;
  readonly rest: Float64Array;
  size = 0;
  constructor(n: number, capacity: number) {
    this.cols = new Int32Array(Math.max(16, capacity));
    this.vals = new Float64Array(Math.max(16, capacity));
    this.rowPtr = new Int32Array(n + 1);
    this.rest = new Float64Array(n);
  }
  /** Empties the builder for the next draw (its arrays are reused). */
  reset(): void {
    this.size = 0;
    this.rowPtr.fill(0);
    this.rest.fill(0);
  }
  /** Makes room for `count` more entries. */
  reserve(count: number): void {
    if (this.size + count <= this.cols.length) return;
    const capacity = Math.max(this.cols.length * 2, this.size + count);
    const cols = new Int32Array(capacity);
    cols.set(this.cols);
    this.cols = cols;
    const vals = new Float64Array(capacity);
    vals.set(this.vals);
    this.vals = vals;
  }
  push(col: number, value: number): void {
    if (this.size === this.cols.length) this.reserve(1);
    this.cols[this.size] = col;
    this.vals[this.size] = value;
    this.size++;
  }
}

/** Index of the first cumulative weight above u in [lo, hi) (binary search). */
function searchCumulative(cumulative: Float64Array, lo: number, hi: number, u: number): number {
  let a = lo;
  let b = hi - 1;
  while (a < b) {
    const mid = (a + b) >>> 1;
    if (cumulative[mid] > u) b = mid;
    else a = mid + 1;
  }
  return a - lo;
}

/**
 * Fills each n-block of `out` with a profile drawn from Dirichlet(that block of `concentration`)
 * and `cumulative` with its running sums. With `hubs` (one group), column j is a hub with
 * probability p_j (one uniform per column with p_j > 0): its rate is Gamma(x_j, 1), else
 * Gamma(concentration_j)/rate; the profile is the rates normalised.
 */
function drawProfiles(
  concentration: Float64Array,
  n: number,
  hubs: ProfileHubs | undefined,
  constants: ProfileConstants,
  gamma: GammaSampler,
  next: () => number,
  out: Float64Array,
  cumulative: Float64Array,
): void {
  const logRate = hubs ? Math.log(hubs.rate) : 0;
  for (let base = 0; base < concentration.length; base += n) {
    let max = Number.NEGATIVE_INFINITY;
    for (let j = base; j < base + n; j++) {
      const p = hubs ? hubs.probability[j - base] : 0;
      const log =
        p > 0 && next() < p
          ? gamma.logGammaAt(constants.hub, j - base)
          : gamma.logGammaAt(constants.concentration, j) - logRate;
      out[j] = log;
      if (log > max) max = log;
    }
    let total = 0;
    for (let j = base; j < base + n; j++) {
      out[j] = Math.exp(out[j] - max);
      total += out[j];
    }
    let running = 0;
    for (let j = base; j < base + n; j++) {
      out[j] /= total;
      running += out[j];
      cumulative[j] = running;
    }
    cumulative[base + n - 1] = 1;
  }
}

interface Scratch {
  readonly logs: Float64Array;
  readonly atoms: Int32Array;
  readonly atomLogs: Float64Array;
  /** Marsaglia–Tsang constants of every observed cell's Gamma(Ĉ_ij), reused by all draws. */
  readonly observed: GammaConstants;
  /** Constants of Gamma(α) for each grid strength (null when the grid holds α = 0). */
  readonly strengths: GammaConstants | null;
  /** 1 where a row is drawn in linear space (its largest observed shape or α ≥ 1/16). */
  readonly linear: Uint8Array;
}

/** Constants of the profile draws: each concentration, and each hub column's shape. */
interface ProfileConstants {
  readonly concentration: GammaConstants;
  readonly hub: GammaConstants;
}

/**
 * Row i of one draw into `rows`: observed cells Gamma(Ĉ_ij), prior part Gamma(α)·W. Variates are
 * combined in log space (the row's largest log is subtracted before exponentiating).
 */
function drawRow(
  plan: DrawPlan,
  i: number,
  alphaIndex: number,
  m: Float64Array,
  mCumulative: Float64Array,
  restProfile: Float64Array,
  mode: RowMode,
  gamma: GammaSampler,
  next: () => number,
  rows: RowBuilder,
  scratch: Scratch,
): void {
  const { n, rowPtr, colIdx } = plan;
  const alpha = plan.grid[alphaIndex];
  const observed = scratch.observed;
  const lo = rowPtr[i];
  const hi = rowPtr[i + 1];
  const base = plan.profileOf[i] * n;
  const off = 1 - m[base + i];
  const restOff = 1 - restProfile[base + i];
  const start = rows.size;
  if (alpha <= 0) {
    if (hi === lo) {
      rows.rest[i] = 1 / restOff; // no prior and no signals: the row follows the drawn profile
      return;
    }
    let max = Number.NEGATIVE_INFINITY;
    for (let k = lo; k < hi; k++) {
      const log = gamma.logGammaAt(observed, k);
      scratch.logs[k - lo] = log;
      if (log > max) max = log;
    }
    let total = 0;
    for (let k = lo; k < hi; k++) {
      const w = Math.exp(scratch.logs[k - lo] - max);
      rows.push(colIdx[k], w);
      total += w;
    }
    for (let p = start; p < rows.size; p++) rows.vals[p] /= total;
    return;
  }
  if (mode !== ROW_CELLS && scratch.linear[i] === 1 && scratch.strengths !== null) {
    // Linear space: the same generator calls in the same order as the log path below, without a
    // log and an exp per variate (see gamma-sampler's LINEAR_MIN_SHAPE for when that is safe).
    rows.reserve(hi - lo);
    const cols = rows.cols;
    for (let k = lo, p = rows.size; k < hi; k++, p++) cols[p] = colIdx[k];
    let total = gamma.fillGammaAt(observed, lo, hi, rows.vals, rows.size);
    rows.size += hi - lo;
    const prior = gamma.gammaAt(scratch.strengths, alphaIndex);
    total += prior;
    finishPriorPart(plan, i, alpha, prior, total, start, mCumulative, restOff, mode, next, rows);
    return;
  }
  const logs = scratch.logs;
  let max = Number.NEGATIVE_INFINITY;
  for (let k = lo; k < hi; k++) {
    const log = gamma.logGammaAt(observed, k);
    logs[k - lo] = log;
    if (log > max) max = log;
  }
  if (mode === ROW_CELLS) {
    // W per cell: Gamma(α m^(i)_j) for every j ≠ i (their sum is the prior part Gamma(α)).
    const scale = alpha / off;
    let atomCount = 0;
    for (let j = 0; j < n; j++) {
      if (j === i) continue;
      const shape = scale * m[base + j];
      if (!(shape > 0)) continue;
      const log = gamma.logGamma(shape);
      scratch.atoms[atomCount] = j;
      scratch.atomLogs[atomCount] = log;
      atomCount++;
      if (log > max) max = log;
    }
    let total = 0;
    for (let k = lo; k < hi; k++) {
      const w = Math.exp(logs[k - lo] - max);
      rows.push(colIdx[k], w);
      total += w;
    }
    for (let t = 0; t < atomCount; t++) {
      const w = Math.exp(scratch.atomLogs[t] - max);
      rows.push(scratch.atoms[t], w);
      total += w;
    }
    for (let p = start; p < rows.size; p++) rows.vals[p] /= total;
    return;
  }
  // The prior part's total is one Gamma(α) variate.
  const logPrior =
    scratch.strengths === null
      ? gamma.logGamma(alpha)
      : gamma.logGammaAt(scratch.strengths, alphaIndex);
  if (logPrior > max) max = logPrior;
  let total = 0;
  for (let k = lo; k < hi; k++) {
    const w = Math.exp(logs[k - lo] - max);
    rows.push(colIdx[k], w);
    total += w;
  }
  const prior = Math.exp(logPrior - max);
  total += prior;
  finishPriorPart(plan, i, alpha, prior, total, start, mCumulative, restOff, mode, next, rows);
}

/**
 * The prior part of row i (its Gamma(α) variate `prior`, on the scale of the row's observed
 * variates, whose sum with it is `total`): along the pooled direction as a rest, or cut into
 * sticks; then the row is normalised.
 */
function finishPriorPart(
  plan: DrawPlan,
  i: number,
  alpha: number,
  prior: number,
  total: number,
  start: number,
  mCumulative: Float64Array,
  restOff: number,
  mode: RowMode,
  next: () => number,
  rows: RowBuilder,
): void {
  if (mode === ROW_POOLED) {
    // Along the group's pooled direction W_g (drawPooled), as a rest.
    for (let p = start; p < rows.size; p++) rows.vals[p] /= total;
    rows.rest[i] = prior / total / restOff;
    return;
  }
  // Stick-breaking for W.
  const n = plan.n;
  const base = plan.profileOf[i] * n;
  let remaining = 1;
  const inverseAlpha = 1 / alpha;
  while (remaining > STICK_REMAINDER) {
    const v = 1 - (1 - next()) ** inverseAlpha; // Beta(1, α) by inversion
    const piece = remaining * v;
    remaining -= piece;
    let j = i;
    while (j === i) j = searchCumulative(mCumulative, base, base + n, next());
    rows.push(j, prior * piece);
  }
  for (let p = start; p < rows.size; p++) rows.vals[p] /= total;
  rows.rest[i] = (prior * remaining) / total / restOff;
}

/** Scratch shared by the draws of one range. */
interface RangeScratch extends Scratch {
  readonly m: Float64Array;
  readonly mCumulative: Float64Array;
  /** The profile the rows' rest follows: W_g where a group pools, else m. */
  readonly restProfile: Float64Array;
  readonly alphas: Float64Array;
  readonly modes: Uint8Array;
  /** ĉ_i. */
  readonly rowTotals: Float64Array;
  /** Each row's grid index of α_i in the current draw. */
  readonly alphaIndex: Int32Array;
  readonly profileConstants: ProfileConstants;
  /** The drawn matrix's storage, reused draw after draw. */
  readonly rows: RowBuilder;
}

function rangeScratch(plan: DrawPlan): RangeScratch {
  const n = plan.n;
  let maxRow = 0;
  for (let i = 0; i < n; i++) maxRow = Math.max(maxRow, plan.rowPtr[i + 1] - plan.rowPtr[i]);
  const { grid, effective, rowPtr } = plan;
  let positiveGrid = grid.length > 0;
  for (let g = 0; g < grid.length; g++) if (!(grid[g] > 0)) positiveGrid = false;
  // A row goes linear when its largest shape (observed cells or the smallest α it can draw) is
  // at least LINEAR_MIN_SHAPE: then its total cannot underflow (gamma-sampler's module header).
  let smallestAlpha = Number.POSITIVE_INFINITY;
  for (let g = 0; g < grid.length; g++) smallestAlpha = Math.min(smallestAlpha, grid[g]);
  const linear = new Uint8Array(n);
  for (let i = 0; i < n; i++) {
    let largest = smallestAlpha;
    for (let k = rowPtr[i]; k < rowPtr[i + 1]; k++) largest = Math.max(largest, effective[k]);
    linear[i] = largest >= LINEAR_MIN_SHAPE ? 1 : 0;
  }
  const hubShapes = new Float64Array(n).fill(1); // 1 where a column is never a hub (unused)
  if (plan.hubs) {
    for (let j = 0; j < n; j++) {
      if (plan.hubs.probability[j] > 0) hubShapes[j] = plan.hubs.shape[j];
    }
  }
  return {
    logs: new Float64Array(Math.max(1, maxRow)),
    atoms: new Int32Array(n),
    atomLogs: new Float64Array(n),
    observed: gammaConstants(effective),
    strengths: positiveGrid ? gammaConstants(grid) : null,
    linear,
    m: new Float64Array(plan.concentration.length),
    mCumulative: new Float64Array(plan.concentration.length),
    restProfile: new Float64Array(plan.concentration.length),
    alphas: new Float64Array(n),
    modes: new Uint8Array(n),
    rowTotals: rowTotalsOf(plan),
    alphaIndex: new Int32Array(n),
    profileConstants: {
      concentration: gammaConstants(plan.concentration),
      hub: gammaConstants(hubShapes),
    },
    rows: new RowBuilder(n, effective.length + 8 * n),
  };
}

function rowTotalsOf(plan: DrawPlan): Float64Array {
  const out = new Float64Array(plan.n);
  for (let i = 0; i < plan.n; i++) {
    let c = 0;
    for (let k = plan.rowPtr[i]; k < plan.rowPtr[i + 1]; k++) c += plan.effective[k];
    out[i] = c;
  }
  return out;
}

/** A row above this part of its group's Σ w²/(α+1) is not pooled (see `drawPooled`). */
export const POOL_HEAVY = 0.02;
const ROW_CELLS = 0;
const ROW_STICKS = 1;
const ROW_POOLED = 2;
type RowMode = typeof ROW_CELLS | typeof ROW_STICKS | typeof ROW_POOLED;

/**
 * The pooled prior direction of each group with pooled rows (`settings.posterior` "pooled"): one
 * W_g ~ Dirichlet(A_g·m_g) per draw, where A_g matches, to first order, the covariance that the
 * rows' independent prior parts give the s-weighted column sums that move the shares
 * (s·dA): with w_i = s_i·α_i/(ĉ_i+α_i) over the group's pooled rows,
 * A_g + 1 = (Σ w_i)² / Σ w_i²/(α_i+1), since Cov Dirichlet(α·m) = (diag m − m mᵀ)/(α+1).
 * The matching ignores that row i's prior leaves out column i, so rows heavy in the sum are drawn
 * per cell instead. Other groups' rest follows m_g.
 */
function drawPooled(
  plan: DrawPlan,
  scratch: RangeScratch,
  gamma: GammaSampler,
  groups: number,
): void {
  const { n, profileOf, start } = plan;
  const { m, restProfile, alphas, modes, rowTotals } = scratch;
  restProfile.set(m);
  const sum = new Float64Array(groups);
  const squares = new Float64Array(groups);
  const weight = (i: number): number => (start[i] * alphas[i]) / (rowTotals[i] + alphas[i]);
  // A row that carries more than POOL_HEAVY of its group's Σ w²/(α+1) is drawn per cell: its own
  // column is left out of its prior, which a pooled direction would miss (a leader's row would
  // inflate the leader's own spread). One pass: the rest each carry little.
  for (let pass = 0; pass < 2; pass++) {
    sum.fill(0);
    squares.fill(0);
    for (let i = 0; i < n; i++) {
      if (modes[i] !== ROW_POOLED) continue;
      const w = weight(i);
      sum[profileOf[i]] += w;
      squares[profileOf[i]] += (w * w) / (alphas[i] + 1);
    }
    if (pass === 1) break;
    for (let i = 0; i < n; i++) {
      if (modes[i] !== ROW_POOLED) continue;
      const w = weight(i);
      if ((w * w) / (alphas[i] + 1) > POOL_HEAVY * squares[profileOf[i]]) modes[i] = ROW_CELLS;
    }
  }
  for (let g = 0; g < groups; g++) {
    if (!(squares[g] > 0)) continue;
    const strength = Math.max(1e-3, (sum[g] * sum[g]) / squares[g] - 1);
    const base = g * n;
    let max = Number.NEGATIVE_INFINITY;
    for (let j = base; j < base + n; j++) {
      // A profile entry that underflowed to 0 in this draw gets no pooled weight (as per cell).
      const shape = strength * m[j];
      const log = shape > 0 ? gamma.logGamma(shape) : Number.NEGATIVE_INFINITY;
      restProfile[j] = log;
      if (log > max) max = log;
    }
    let total = 0;
    for (let j = base; j < base + n; j++) {
      restProfile[j] = Math.exp(restProfile[j] - max);
      total += restProfile[j];
    }
    for (let j = base; j < base + n; j++) restProfile[j] /= total;
  }
}

function drawMatrixInto(plan: DrawPlan, k: number, scratch: RangeScratch): AttentionRows {
  const { n, grid, cumulative, concentration } = plan;
  const G = grid.length;
  const { m, mCumulative, alphas, modes, alphaIndex } = scratch;
  const rng = createDrawRng(plan.seed, k);
  const gamma = createGammaSampler(rng);
  const next = () => rng.next();
  drawProfiles(concentration, n, plan.hubs, scratch.profileConstants, gamma, next, m, mCumulative);
  const rows = scratch.rows;
  rows.reset();
  const exact = plan.forceExact === true || posteriorMethod(n) === "exact";
  const stickCost = Math.log(1 / STICK_REMAINDER);
  let restProfile = m;
  if (!exact) {
    // Strengths first: the pooled directions depend on which rows pool and how strongly.
    for (let i = 0; i < n; i++) {
      const g = G === 1 ? 0 : searchCumulative(cumulative, i * G, (i + 1) * G, rng.next());
      alphas[i] = grid[g];
      alphaIndex[i] = g;
      modes[i] = alphas[i] * stickCost >= n - 1 ? ROW_POOLED : ROW_STICKS;
    }
    drawPooled(plan, scratch, gamma, concentration.length / n);
    restProfile = scratch.restProfile;
  }
  for (let i = 0; i < n; i++) {
    let g: number;
    let mode: RowMode;
    if (exact) {
      g = G === 1 ? 0 : searchCumulative(cumulative, i * G, (i + 1) * G, rng.next());
      mode = ROW_CELLS;
    } else {
      g = alphaIndex[i];
      mode = modes[i] as RowMode;
    }
    if (n > 1) {
      drawRow(plan, i, g, m, mCumulative, restProfile, mode, gamma, next, rows, scratch);
    }
    rows.rowPtr[i + 1] = rows.size;
  }
  return {
    n,
    rowPtr: rows.rowPtr,
    colIdx: rows.cols.subarray(0, rows.size),
    values: rows.vals.subarray(0, rows.size),
    rest: rows.rest,
    profile: Float64Array.from(restProfile),
    profileOf: plan.profileOf,
  };
}

/** Posterior draw k of the attention matrix A (before any transform). */
export function drawAttentionMatrix(plan: DrawPlan, k: number): AttentionRows {
  if (!Number.isInteger(k) || k < 0)
    throw new RangeError(`draw index must be an integer ≥ 0, got ${k}`);
  return drawMatrixInto(plan, k, rangeScratch(plan));
}

/**
 * Draws k ∈ [from, to) of the posterior shares. Pure: the result depends only on `plan`, `from`
 * and `to` (and `transform`), never on which other draws are computed, or where.
 */
export function drawShares(
  plan: DrawPlan,
  from: number,
  to: number,
  transform?: (rows: AttentionRows) => AttentionRows,
): DrawRange {
  checkSelfWeight(plan.selfWeight);
  if (!Number.isInteger(from) || !Number.isInteger(to) || from < 0 || to < from) {
    throw new RangeError(`draw range must be integers 0 ≤ from ≤ to, got [${from}, ${to})`);
  }
  const n = plan.n;
  const count = to - from;
  const shares = new Float64Array(count * n);
  const effectiveVoices = new Float64Array(count);
  if (n === 0) return { shares, effectiveVoices };
  const scratch = rangeScratch(plan);
  for (let k = from; k < to; k++) {
    const drawn = drawMatrixInto(plan, k, scratch);
    const solved = stationaryVector(transform ? transform(drawn) : drawn, {
      selfWeight: plan.selfWeight,
      start: plan.start,
      tolerance: DRAW_TOLERANCE,
    }).vector;
    const offset = (k - from) * n;
    let squares = 0;
    for (let j = 0; j < n; j++) {
      shares[offset + j] = solved[j];
      squares += solved[j] * solved[j];
    }
    effectiveVoices[k - from] = squares > 0 ? 1 / squares : 0;
  }
  return { shares, effectiveVoices };
}

/**
 * K posterior draws of the shares for `counts` (a convenience over `buildAttentionPrior`,
 * `drawPlan` and `drawShares`), one Float64Array per draw.
 */
export function posteriorShares(
  counts: CountMatrix,
  options: {
    readonly background: Background;
    readonly selfWeight: number;
    readonly samples: number;
    readonly seed: number;
    readonly start?: Float64Array;
    readonly groupOf?: Int32Array;
  },
): Float64Array[] {
  const { samples } = options;
  if (!Number.isInteger(samples) || samples < 0) {
    throw new RangeError(`samples must be a non-negative integer, got ${samples}`);
  }
  const prior = buildAttentionPrior(counts, options.background, options.groupOf);
  const n = prior.n;
  const start = options.start ?? new Float64Array(n).fill(n > 0 ? 1 / n : 0);
  const plan = drawPlan(counts, prior, {
    selfWeight: options.selfWeight,
    seed: options.seed,
    start,
  });
  const { shares } = drawShares(plan, 0, samples);
  const out: Float64Array[] = [];
  for (let k = 0; k < samples; k++) out.push(shares.slice(k * n, (k + 1) * n));
  return out;
}
