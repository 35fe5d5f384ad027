/**
 * @module format-periods
 * Format periods from a snapshot's format changes (DESIGN.md §3): a change names the format from
 * its `at` on, until the next change (by time; equal times keep applied order, the later applied
 * wins, as group labels do); `null` ends the period. The last open period runs to `until`.
 */
import type { FormatChange } from "../domain/ledger.js";

/** One run of a single format: signals with `start` < t ≤ `end` belong to it. */
export interface FormatPeriod {
  readonly format: string;
  readonly start: number;
  readonly end: number;
  /** True when the period is still running at `until`. */
  readonly open: boolean;
}

function sortedChanges(changes: readonly FormatChange[]): FormatChange[] {
  // Array.prototype.sort is stable (ECMAScript 2019), so equal times keep applied order.
  return [...changes].sort((a, b) => a.at - b.at);
}

/** The format in force at `at` (null when none). */
export function formatAt(changes: readonly FormatChange[], at: number): string | null {
  let current: string | null = null;
  for (const change of sortedChanges(changes)) {
    if (change.at > at) break;
    current = change.format;
  }
  return current;
}

/**
 * The periods that started at or before `until`, in time order (one just started is listed,
 * still empty). A change to the format already
 * running does not split its period; equal-time changes collapse to the last applied.
 */
export function formatPeriods(changes: readonly FormatChange[], until: number): FormatPeriod[] {
  const periods: FormatPeriod[] = [];
  let current: { format: string; start: number } | null = null;
  const sorted = sortedChanges(changes).filter((c) => c.at <= until);
  for (let i = 0; i < sorted.length; i++) {
    const change = sorted[i];
    if (i + 1 < sorted.length && sorted[i + 1].at === change.at) continue;
    if (current !== null && current.format === change.format) continue;
    if (current !== null && change.at > current.start) {
      periods.push({ format: current.format, start: current.start, end: change.at, open: false });
    }
    current = change.format === null ? null : { format: change.format, start: change.at };
  }
  if (current !== null && until >= current.start) {
    periods.push({ format: current.format, start: current.start, end: until, open: true });
  }
  return periods;
}

/** Distinct format names in order of first use. */
export function formatNames(periods: readonly FormatPeriod[]): string[] {
  return [...new Set(periods.map((p) => p.format))];
}
