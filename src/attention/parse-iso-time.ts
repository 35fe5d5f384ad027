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
  const fast = parseUtcMillisOrSeconds(text);
  return fast === undefined ? parseIsoTimeGeneral(text) : fast;
}

/** The two-digit number at `at`, or −1 when either character is not an ASCII digit. */
function twoDigits(text: string, at: number): number {
  const a = text.charCodeAt(at) - 48;
  const b = text.charCodeAt(at + 1) - 48;
  return a >= 0 && a <= 9 && b >= 0 && b <= 9 ? a * 10 + b : -1;
}

/**
 * The shapes logs are written in, `YYYY-MM-DDThh:mm:ss.fffZ` (what `Date.toISOString` gives) and
 * `YYYY-MM-DDThh:mm:ssZ`, read by character codes instead of the pattern (a third of the log
 * reader's time went to it): the same checks and the same result, or undefined for any other
 * shape, and years below 100, which go through `parseIsoTimeGeneral`.
 */
function parseUtcMillisOrSeconds(text: string): number | null | undefined {
  const length = text.length;
  if (length !== 24 && length !== 20) return undefined;
  if (
    text.charCodeAt(length - 1) !== 90 || // Z
    text.charCodeAt(4) !== 45 || // -
    text.charCodeAt(7) !== 45 ||
    text.charCodeAt(10) !== 84 || // T
    text.charCodeAt(13) !== 58 || // :
    text.charCodeAt(16) !== 58 ||
    (length === 24 && text.charCodeAt(19) !== 46) // .
  ) {
    return undefined;
  }
  const century = twoDigits(text, 0);
  const yy = twoDigits(text, 2);
  const month = twoDigits(text, 5);
  const day = twoDigits(text, 8);
  const hour = twoDigits(text, 11);
  const minute = twoDigits(text, 14);
  const second = twoDigits(text, 17);
  let millis = 0;
  if (length === 24) {
    const high = twoDigits(text, 20);
    const low = text.charCodeAt(22) - 48;
    if (high < 0 || !(low >= 0 && low <= 9)) return undefined;
    millis = high * 10 + low;
  }
  if ((century | yy | month | day | hour | minute | second) < 0) return undefined;
  const year = century * 100 + yy;
  if (year < 100) return undefined; // Date.UTC would read 0–99 as 1900–1999
  if (month < 1 || month > 12 || day < 1 || day > daysInMonth(year, month)) return null;
  if (hour > 23 || minute > 59 || second > 59) return null;
  return Date.UTC(year, month - 1, day, hour, minute, second, millis);
}

/** Any shape the pattern allows. */
function parseIsoTimeGeneral(text: string): number | null {
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
