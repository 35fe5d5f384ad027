/**
 * The shared escape of text outputs. Which characters are controls: ECMA-48 (5th edition 1991)
 * C0 0x00–0x1F, DEL 0x7F and C1 0x80–0x9F (0x9B is the single-byte CSI); the bidirectional
 * controls of Unicode Standard Annex #9 (U+202A–U+202E, U+2066–U+2069, marks U+200E/U+200F,
 * U+061C). The JSON check uses the platform's own JSON.parse (ECMA-404 `\uXXXX` escapes).
 */
import { describe, expect, it } from "vitest";
import { printable, printableLine } from "../../src/report/printable.js";
import { renderText } from "../../src/report/render-text.js";

describe("printable", () => {
  it("escapes ESC [ 2 J, NUL, BEL, DEL, CSI and the bidi override, and nothing else", () => {
    expect(printable("a\u001b[2Jb\u0000c\u0007d\u007fe\u009bf\u202eg")).toBe(
      "a\\u001b[2Jb\\u0000c\\u0007d\\u007fe\\u009bf\\u202eg",
    );
    expect(printable("zoë 😀 👩‍💻 5–7% ■·[]|")).toBe("zoë 😀 👩‍💻 5–7% ■·[]|");
  });

  it("keeps line feeds and tabs in whole texts, escapes them in single values", () => {
    expect(printable("one\ntwo\tthree\rfour")).toBe("one\ntwo\tthree\\u000dfour");
    expect(printableLine("one\ntwo\tthree")).toBe("one\\u000atwo\\u0009three");
  });

  it("leaves escaped JSON valid and meaning the same", () => {
    const value = { id: "x\u009b\u202e\u2028y" };
    const escaped = printable(JSON.stringify(value));
    expect(escaped).not.toContain("\u009b");
    expect(JSON.parse(escaped)).toEqual(value);
  });

  it("keeps a label holding a line feed on its own line in the text renderer", () => {
    const text = renderText([
      {
        kind: "bars",
        caption: "Shares",
        line: null,
        rows: [{ label: "ana\nFAKE LINE\u001b[2J", value: 0.5, low: 0.4, high: 0.6, text: "50%" }],
      },
    ]);
    expect(text.split("\n").filter((l) => l.includes("FAKE LINE"))).toEqual([
      expect.stringContaining("ana\\u000aFAKE LINE\\u001b[2J"),
    ]);
    expect(text).not.toContain("\u001b");
  });
});
