/**
 * @module format
 * How figures are written for people: shares as whole percentages ("31%", "24–38%"; "<1%" for
 * small non-zero shares), effective voices with one decimal ("5.2 of 12"), probabilities that are
 * never printed as certainties ("over 99%", "under 1%"), and changes computed from the very values
 * the reader sees, so "11.6 → 11.7" is "+0.1" and "14% → 14%" is "no change".
 */

export function percent(x: number): string {
  if (x > 0 && x < 0.005) return "<1%";
  return `${Math.round(x * 100)}%`;
}

export function percentRange(low: number, high: number): string {
  const lo = percent(low).replace("%", "");
  return `${lo}–${percent(high)}`;
}

/**
 * A probability from posterior draws, never as a certainty: a finite number of draws can show
 * 100% or 0% without the event being sure, so anything that would print as 100% (or 0%) prints
 * as "over 99%" ("under 1%").
 */
export function probability(p: number): string {
  if (p >= 0.995) return "over 99%";
  if (p < 0.005) return "under 1%";
  return `${Math.round(p * 100)}%`;
}

export function decimal1(x: number): string {
  return x.toFixed(1);
}

export function voicesOf(value: number, members: number): string {
  return `${decimal1(value)} of ${members}`;
}

export function isoDay(iso: string): string {
  return iso.slice(0, 10);
}

/** The number a printed figure shows ("45%" → 45, "<1%" → 0, "4.3" → 4.3). */
function shown(text: string): number {
  return text.startsWith("<") ? 0 : Number.parseFloat(text);
}

/**
 * The change between two printed figures, computed from the printed texts themselves (so the
 * reader's own subtraction agrees): "+0.1", "−12", or null when they print the same.
 */
export function printedChange(before: string, after: string, digits: number): string | null {
  const delta = Number((shown(after) - shown(before)).toFixed(digits));
  if (delta === 0) return null;
  return `${delta > 0 ? "+" : "−"}${Math.abs(delta).toFixed(digits)}`;
}

/** "effective voices +0.1 (11.6 → 11.7)" or "effective voices: no change (11.6)". */
export function changeText(
  what: string,
  before: string,
  after: string,
  digits: number,
  unit = "",
): string {
  const delta = printedChange(before, after, digits);
  if (delta === null) return `${what}: no change (${after})`;
  const plural = unit === "point" && Math.abs(shown(delta.replace("−", "-"))) !== 1 ? "s" : "";
  return `${what} ${delta}${unit ? ` ${unit}${plural}` : ""} (${before} → ${after})`;
}
