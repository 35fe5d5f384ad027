/**
 * @module parse-iso-time
 * Strict parsing of ISO 8601 extended-format date-times with a zone designator (ISO 8601-1:2019;
 * the RFC 3339 profile: `YYYY-MM-DDThh:mm[:ss[.fff]]` then `Z` or `±hh:mm`) into epoch
 * milliseconds, refusing dates that do not exist (February 30th, hour 24) rather than rolling them
 * over as `Date` does. Fractions beyond milliseconds are truncated.
 */

const PATTERN =
  /^(\d{4})-(\d{2})-(\d{2})T(\d{2}):(\d{2})(?::(\d{2})(?:[.,](\d{1,9}))?)?(Z|[+-]\d{2}:\d{2})$/;

/** Epoch ms of an ISO 8601 date-time with a zone, or null when it is malformed or not a real time. */
export function parseIsoTime(text: string): number | null {
  const match = PATTERN.exec(text);
  if (match === null) return null;
  const [, y, mo, d, h, mi, s, fraction, zone] = match;
  const year = Number(y);
  const month = Number(mo);
  const day = Number(d);
  const hour = Number(h);
  const minute = Number(mi);
  const second = s === undefined ? 0 : Number(s);
  if (month < 1 || month > 12 || day < 1 || day > daysInMonth(year, month)) return null;
  if (hour > 23 || minute > 59 || second > 59) return null;
  const millis = fraction === undefined ? 0 : Number(fraction.slice(0, 3).padEnd(3, "0"));
  let offsetMinutes = 0;
  if (zone !== "Z") {
    const offsetHours = Number(zone.slice(1, 3));
    const offsetMins = Number(zone.slice(4, 6));
    if (offsetHours > 23 || offsetMins > 59) return null;
    offsetMinutes = (zone[0] === "-" ? -1 : 1) * (offsetHours * 60 + offsetMins);
  }
  const date = new Date(0);
  date.setUTCFullYear(year, month - 1, day); // setUTCFullYear keeps years 0–99 literal
  date.setUTCHours(hour, minute, second, millis);
  return date.getTime() - offsetMinutes * 60_000;
}

function daysInMonth(year: number, month: number): number {
  if (month === 2) {
    const leap = (year % 4 === 0 && year % 100 !== 0) || year % 400 === 0;
    return leap ? 29 : 28;
  }
  return month === 4 || month === 6 || month === 9 || month === 11 ? 30 : 31;
}
