/**
 * @module slot-period
 * Period labels for post claims. A digest slot is named by its local date-time in the channel's
 * time zone, e.g. "2026-11-02T09:00[Europe/Berlin]" (the bracketed-zone suffix of RFC 9557), so a
 * wall-clock time that occurs twice when clocks go back still names one slot. A note slot is the
 * UTC hour, e.g. "2026-11-02T08:00Z", which never repeats.
 */
import { PlumblineError } from "../domain/errors.js";

export const HOUR_MS = 3_600_000;

const formatters = new Map<string, Intl.DateTimeFormat>();

function formatterFor(timeZone: string): Intl.DateTimeFormat {
  const cached = formatters.get(timeZone);
  if (cached !== undefined) return cached;
  let formatter: Intl.DateTimeFormat;
  try {
    formatter = new Intl.DateTimeFormat("en-US", {
      timeZone,
      year: "numeric",
      month: "2-digit",
      day: "2-digit",
      hour: "2-digit",
      minute: "2-digit",
      hourCycle: "h23",
    });
  } catch (error) {
    throw new PlumblineError("SETTING_BAD_VALUE", `unknown time zone ${JSON.stringify(timeZone)}`, {
      hint: "set the channel's timezone to an IANA name such as Europe/Berlin or UTC",
      cause: error,
    });
  }
  formatters.set(timeZone, formatter);
  return formatter;
}

/** Throws SETTING_BAD_VALUE unless `timeZone` is a time zone this runtime knows. */
export function assertTimeZone(timeZone: string): void {
  formatterFor(timeZone);
}

/** The local date-time of `at` (epoch ms) in `timeZone` as "YYYY-MM-DDTHH:MM". */
export function localDateTime(at: number, timeZone: string): string {
  const parts = new Map(
    formatterFor(timeZone)
      .formatToParts(new Date(at))
      .map((p) => [p.type, p.value]),
  );
  return `${parts.get("year")}-${parts.get("month")}-${parts.get("day")}T${parts.get("hour")}:${parts.get("minute")}`;
}

/** The claim period of a digest slot: "2026-11-02T09:00[Europe/Berlin]". */
export function digestPeriod(slotAt: number, timeZone: string): string {
  return `${localDateTime(slotAt, timeZone)}[${timeZone}]`;
}

/** Start of the UTC hour containing `at`. */
export function hourStart(at: number): number {
  return Math.floor(at / HOUR_MS) * HOUR_MS;
}

/** The claim period of the note slot containing `at`: "2026-11-02T08:00Z". */
export function notePeriod(at: number): string {
  return `${new Date(hourStart(at)).toISOString().slice(0, 16)}Z`;
}
