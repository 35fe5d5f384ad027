/**
 * @module printable
 * The one escape for every text output (CLI, console, text renderer): control characters become
 * visible `\uXXXX` escapes, so an id or label holding a terminal escape sequence cannot clear the
 * screen, move the cursor or hide text. Escaped: the C0 and C1 control sets and DEL (ECMA-48,
 * 5th edition 1991, §5: ESC and the single-byte CSI 0x9B start control sequences), the Unicode
 * bidirectional embedding, override and isolate controls and the line and paragraph separators
 * (Unicode Standard Annex #9; Boucher and Anderson 2021, "Trojan Source: Invisible
 * Vulnerabilities", which reorders displayed text with them). `\uXXXX` is also a valid JSON
 * escape, so escaping JSON text keeps it valid and meaning the same.
 */

// \p{Cc} is C0, DEL and C1; then the bidi controls and U+2028/U+2029.
const UNSAFE = /[\p{Cc}\u061c\u200e\u200f\u2028-\u202e\u2066-\u2069]/gu;

function escapeChar(char: string): string {
  return `\\u${char.charCodeAt(0).toString(16).padStart(4, "0")}`;
}

/** `text` with every control character escaped except line feeds and tabs (whole outputs). */
export function printable(text: string): string {
  return text.replace(UNSAFE, (char) => (char === "\n" || char === "\t" ? char : escapeChar(char)));
}

/** `text` with every control character escaped, line feeds and tabs too (one value in a line). */
export function printableLine(text: string): string {
  return text.replace(UNSAFE, escapeChar);
}
