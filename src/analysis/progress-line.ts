/**
 * @module progress-line
 * The stderr line of a long analysis (issue 12): nothing for the first 2 s, then at most one line
 * a second with the elapsed time and the draws done of K, and a last line when the draws finish.
 * The clock is passed in, so tests drive it without waiting.
 */
import type { DrawProgress } from "./analysis-job.js";

export interface ProgressLineOptions {
  /** Milliseconds, monotonic. */
  readonly now: () => number;
  readonly write: (line: string) => void;
  /** Silent until this many ms have passed; default 2000. */
  readonly after?: number;
  /** At most one line per this many ms; default 1000. */
  readonly every?: number;
}

export function progressLine(options: ProgressLineOptions): DrawProgress {
  const start = options.now();
  const after = options.after ?? 2000;
  const every = options.every ?? 1000;
  let lastLine = Number.NEGATIVE_INFINITY;
  return (done, total) => {
    const now = options.now();
    const elapsed = now - start;
    if (elapsed < after) return;
    if (done < total && now - lastLine < every) return;
    lastLine = now;
    options.write(
      `plumbline: analysing, ${(elapsed / 1000).toFixed(1)} s, draws ${done} of ${total}\n`,
    );
  };
}
