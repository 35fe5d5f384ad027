/**
 * @module text-metrics
 * Width and height of chart text without a browser, so labels can be placed before anything is
 * drawn. The charts name system sans-serif fonts, which resolve to DejaVu Sans on the Debian
 * machines that render them (Chromium and resvg alike); the advance widths below are DejaVu Sans
 * Book's (units per em 2048, read from memory of the font's metrics and checked against Chromium's
 * `getBBox` in the browser tests). Bold text is about 13% wider. Unknown characters count as the
 * widest Latin letter, so an estimate errs on the wide side.
 */

/** Advance width in em of DejaVu Sans Book, by character. */
const ADVANCE: Readonly<Record<string, number>> = (() => {
  const table: Record<string, number> = {};
  const set = (chars: string, width: number) => {
    for (const ch of chars) table[ch] = width;
  };
  set("0123456789", 0.636);
  set(" .,:;!|", 0.318);
  set("il'j", 0.278);
  set("f", 0.352);
  set("t", 0.392);
  set("r", 0.411);
  set("s", 0.521);
  set("z", 0.525);
  set("c", 0.55);
  set("k", 0.579);
  set("vxy", 0.592);
  set("a", 0.613);
  set("eo", 0.615);
  set("bdghnpqu", 0.635);
  set("w", 0.818);
  set("m", 0.974);
  set("IJ", 0.295);
  set("L", 0.557);
  set("F", 0.575);
  set("PTY", 0.611);
  set("E", 0.632);
  set("S", 0.635);
  set("K", 0.656);
  set("ABVXZ", 0.685);
  set("R", 0.695);
  set("C", 0.698);
  set("U", 0.732);
  set("H", 0.752);
  set("N", 0.748);
  set("DG", 0.775);
  set("OQ", 0.787);
  set("M", 0.863);
  set("W", 0.989);
  set("-", 0.361);
  set("()[]", 0.39);
  set("/", 0.337);
  set("–", 0.5);
  set("—", 1);
  set("%", 0.95);
  set("·", 0.318);
  set("…", 1);
  set("=+~<>→←", 0.838);
  set("#", 0.838);
  set("&", 0.78);
  set("_", 0.5);
  set("?", 0.531);
  return table;
})();

const FALLBACK = 1;
const BOLD_FACTOR = 1.13;
/** Ascent + descent of DejaVu Sans (hhea 1901 + 483 over 2048), the height of a text box. */
export const LINE_BOX = 1.17;
/** Distance from the baseline up to the top of the text box, in em. */
export const ASCENT = 0.93;

/** Estimated width in px of `content` at `size` px. */
export function textWidth(content: string, size: number, weight: "normal" | "bold" = "normal") {
  let em = 0;
  for (const ch of content) em += ADVANCE[ch] ?? FALLBACK;
  return em * size * (weight === "bold" ? BOLD_FACTOR : 1);
}

export interface Box {
  readonly x: number;
  readonly y: number;
  readonly width: number;
  readonly height: number;
}

/** The box of one line of text whose baseline starts (or is anchored) at x, y. */
export function textBox(args: {
  x: number;
  y: number;
  content: string;
  size: number;
  anchor?: "start" | "middle" | "end";
  weight?: "normal" | "bold";
}): Box {
  const width = textWidth(args.content, args.size, args.weight ?? "normal");
  const left =
    args.anchor === "middle" ? args.x - width / 2 : args.anchor === "end" ? args.x - width : args.x;
  return { x: left, y: args.y - ASCENT * args.size, width, height: LINE_BOX * args.size };
}

/** The longest prefix of `content` (with "…") that fits `maxWidth`; the whole text when it fits. */
export function fitText(
  content: string,
  size: number,
  maxWidth: number,
  weight: "normal" | "bold" = "normal",
): string {
  if (textWidth(content, size, weight) <= maxWidth) return content;
  const chars = [...content];
  while (chars.length > 1 && textWidth(`${chars.join("")}…`, size, weight) > maxWidth) chars.pop();
  return `${chars.join("")}…`;
}
