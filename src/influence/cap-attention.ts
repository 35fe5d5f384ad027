/**
 * @module cap-attention
 * The what-if of DESIGN.md §6: cap any one target's part of each member's attention (a row of A)
 * at `cap`, spreading the excess over that member's other targets in proportion to their current
 * parts (water-filling: repeat until no part exceeds the cap; when no other target has any
 * attention, as with β = 0 and one target, the excess is spread evenly). Works on the sparse-plus-even row
 * form, treating a row's unobserved targets as one block of equal parts. The self-weight σ is not
 * attention to others and is left alone.
 */
import { PlumblineError } from "../domain/errors.js";
import { type AttentionRows, withUniformRest } from "./attention-rows.js";

/** Returns new rows with every off-diagonal part ≤ cap; throws CAP_INFEASIBLE if cap < 1/(n−1). */
export function capAttentionRows(given: AttentionRows, cap: number): AttentionRows {
  const rows = withUniformRest(given);
  const { n, rowPtr, colIdx, values, rest } = rows;
  if (!(cap > 0 && cap <= 1)) {
    throw new PlumblineError("CAP_INFEASIBLE", `the cap must be a share in (0, 1], got ${cap}`, {
      hint: "give a share such as 0.25",
    });
  }
  if (n > 1 && cap * (n - 1) < 1 - 1e-12) {
    throw new PlumblineError(
      "CAP_INFEASIBLE",
      `a cap of ${cap} is below an even split over the other ${n - 1} members (${(1 / (n - 1)).toFixed(4)}), so no attention could stay under it`,
      { hint: `use a cap of at least ${(1 / (n - 1)).toFixed(4)}` },
    );
  }
  const outValues = new Float64Array(values.length);
  const outRest = new Float64Array(n);
  for (let i = 0; i < n; i++) {
    const start = rowPtr[i];
    const end = rowPtr[i + 1];
    const stored = end - start;
    let storedOff = 0;
    const parts = new Float64Array(stored);
    for (let k = start; k < end; k++) {
      const j = colIdx[k];
      parts[k - start] = values[k] + (j === i ? 0 : rest[i]);
      if (j !== i) storedOff++;
    }
    const unobserved = n - 1 - storedOff;
    let restPart = rest[i];
    const capped = new Uint8Array(stored);
    let diagonal = 0;
    for (let k = start; k < end; k++) {
      if (colIdx[k] === i) {
        capped[k - start] = 1; // the diagonal is not attention to others: kept as it is
        diagonal += parts[k - start];
      }
    }
    let restCapped = false;
    for (;;) {
      let over = false;
      for (let k = 0; k < stored; k++) if (!capped[k] && parts[k] > cap + 1e-15) over = true;
      if (!restCapped && unobserved > 0 && restPart > cap + 1e-15) over = true;
      if (!over) break;
      let fixedMass = diagonal;
      let freeMass = 0;
      for (let k = 0; k < stored; k++) {
        if (colIdx[start + k] === i) continue;
        if (capped[k] || parts[k] > cap) {
          capped[k] = 1;
          parts[k] = cap;
          fixedMass += cap;
        } else freeMass += parts[k];
      }
      if (!restCapped && unobserved > 0 && restPart > cap) {
        restCapped = true;
        restPart = cap;
      }
      if (restCapped) fixedMass += unobserved * cap;
      else freeMass += unobserved * restPart;
      if (freeMass <= 0) {
        // No other target has any attention to take the excess (β = 0 and a single target):
        // spread it evenly over the remaining members, as a member with no signals would.
        freeMass = 0;
        for (let k = 0; k < stored; k++) {
          if (!capped[k]) {
            parts[k] = 1;
            freeMass += 1;
          }
        }
        if (!restCapped) {
          restPart = 1;
          freeMass += unobserved;
        }
        if (freeMass <= 0) break;
      }
      const scale = (1 - fixedMass) / freeMass;
      for (let k = 0; k < stored; k++) if (!capped[k]) parts[k] *= scale;
      if (!restCapped) restPart *= scale;
    }
    outRest[i] = restPart;
    for (let k = start; k < end; k++) {
      const j = colIdx[k];
      outValues[k] = parts[k - start] - (j === i ? 0 : restPart);
    }
  }
  return { n, rowPtr, colIdx, values: outValues, rest: outRest };
}
