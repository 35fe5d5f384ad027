/**
 * @module strength-chunks
 * One pass of the prior's strength posterior (attention-prior `strengthRows`) shared between the
 * calling thread and the pool's workers: rows in chunks taken from a counter in a
 * SharedArrayBuffer, results written at the rows' offsets in shared arrays, so the numbers are
 * those of one thread for any number of takers (worker-pool.ts `strengthRowsSync`).
 */
import { type StrengthRowsTask, strengthRows } from "../influence/attention-prior.js";

/** Rows [0, n) of one prior pass in chunks; control = [rows done, failed, next chunk]. */
export interface StrengthTask {
  readonly type: "strength";
  readonly task: StrengthRowsTask;
  readonly chunk: number;
  readonly cumulative: Float64Array;
  readonly strength: Float64Array;
  readonly control: Int32Array;
}

/** Takes chunks of rows until none is left (the other takers take them too). */
export function runStrengthChunks(message: Omit<StrengthTask, "type">): void {
  const { task, chunk, cumulative, strength, control } = message;
  try {
    for (;;) {
      const from = Atomics.add(control, 2, 1) * chunk;
      if (from >= task.n) break;
      const to = Math.min(task.n, from + chunk);
      strengthRows(task, from, to, cumulative, strength);
      Atomics.add(control, 0, to - from);
      Atomics.notify(control, 0);
    }
  } catch {
    Atomics.store(control, 1, 1);
    Atomics.notify(control, 0);
  }
}
