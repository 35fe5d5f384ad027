/**
 * @module date-range
 * Period ranges `YYYY-MM-DD..YYYY-MM-DD` (both days included, UTC) as used by compare.
 */
import { PlumblineError } from "./errors.js";
import { DAY_MS } from "./settings.js";

export interface DateRange {
  /** First instant of the first day (epoch ms, UTC). */
  readonly start: number;
  /** Last instant of the last day (epoch ms, UTC): the analysis's `until`. */
  readonly until: number;
  /** Whole days covered. */
  readonly days: number;
  readonly label: string;
}

const DAY = /^(\d{4})-(\d{2})-(\d{2})$/;

function parseDay(text: string, what: string): number {
  const m = DAY.exec(text);
  const ms = m ? Date.UTC(Number(m[1]), Number(m[2]) - 1, Number(m[3])) : Number.NaN;
  if (!m || new Date(ms).toISOString().slice(0, 10) !== text) {
    throw new PlumblineError("RANGE_BAD", `${what} "${text}" is not a calendar date`, {
      hint: "write ranges as YYYY-MM-DD..YYYY-MM-DD, for example 2026-11-02..2026-11-29",
    });
  }
  return ms;
}

export function parseDateRange(text: string): DateRange {
  const parts = text.split("..");
  if (parts.length !== 2) {
    throw new PlumblineError("RANGE_BAD", `range "${text}" needs two dates joined by ".."`, {
      hint: "write ranges as YYYY-MM-DD..YYYY-MM-DD, for example 2026-11-02..2026-11-29",
    });
  }
  const start = parseDay(parts[0], "start");
  const end = parseDay(parts[1], "end");
  if (end < start) {
    throw new PlumblineError("RANGE_BAD", `range "${text}" ends before it starts`, {
      hint: "put the earlier date first",
    });
  }
  const days = Math.round((end - start) / DAY_MS) + 1;
  return { start, until: end + DAY_MS - 1, days, label: text };
}

/**
 * The `days` whole UTC days ending with `until`'s day, and the `days` days just before them, as
 * [earlier, later]. Whole days, so the two ranges never share a day and read as the labels say.
 */
export function windowAndPrevious(until: number, days: number): [DateRange, DateRange] {
  const day = (ms: number) => new Date(ms).toISOString().slice(0, 10);
  const make = (first: number): DateRange => {
    const last = first + (days - 1) * DAY_MS;
    return { start: first, until: last + DAY_MS - 1, days, label: `${day(first)}..${day(last)}` };
  };
  const lastFirst = Math.floor(until / DAY_MS) * DAY_MS - (days - 1) * DAY_MS;
  return [make(lastFirst - days * DAY_MS), make(lastFirst)];
}
