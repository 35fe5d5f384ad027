/**
 * @module expected-point
 * The model's point estimate at the expected counts (shared/notes/calibration.md): C_ij = (N/n)·P_ij,
 * no noise and no decay, handed to the product's own influence computation with no draws. Its
 * distance from the truth is the prior's shrinkage at this N, apart from sampling noise. This is
 * the suite's one call below `analyzeSnapshot` (a snapshot cannot carry fractional counts); when
 * the model's entry changes, only this file follows it.
 */
import type { CountMatrix } from "../../src/domain/counts.js";
import type { AnalysisSettings } from "../../src/domain/settings.js";
import { analyzeInfluence } from "../../src/influence/analyze-influence.js";
import type { TrueChannel } from "./true-matrix.js";

/** Point shares of the product model at the expected counts of `ratio` signals per member. */
export function pointAtExpectedCounts(
  truth: TrueChannel,
  ratio: number,
  members: readonly string[],
  settings: AnalysisSettings,
): Float64Array {
  const rowPtr = new Int32Array(truth.n + 1);
  const cols: number[] = [];
  const vals: number[] = [];
  truth.rows.forEach((row, i) => {
    for (let k = 0; k < row.targets.length; k++) {
      cols.push(row.targets[k]);
      vals.push(ratio * row.probs[k]);
    }
    rowPtr[i + 1] = cols.length;
  });
  const counts: CountMatrix = {
    members,
    rowPtr,
    colIdx: Int32Array.from(cols),
    values: Float64Array.from(vals),
  };
  return analyzeInfluence(counts, {
    background: settings.background,
    selfWeight: settings.selfWeight,
    samples: 0,
    seed: 1,
  }).shares;
}
