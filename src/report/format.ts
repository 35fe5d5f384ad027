/**
 * @module format
 * How figures are written for people: shares as whole percentages ("31%", "24–38%"; "<1%" for
 * small non-zero shares), effective voices with one decimal ("5.2 of 12").
 */

export function percent(x: number): string {
  if (x > 0 && x < 0.005) return "<1%";
  return `${Math.round(x * 100)}%`;
}

export function percentRange(low: number, high: number): string {
  const lo = percent(low).replace("%", "");
  return `${lo}–${percent(high)}`;
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
