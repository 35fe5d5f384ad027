/**
 * The "did you mean" distance. Reference values: Damerau (1964, "A technique for computer
 * detection and correction of spelling errors", CACM 7(3):171–176) — one insertion, deletion,
 * substitution or adjacent swap is one error; Levenshtein's classic pair kitten → sitting is 3
 * (common textbook example, e.g. Jurafsky & Martin, "Speech and Language Processing", ch. 2; from
 * memory); and the optimal-string-alignment value d("ca", "abc") = 3 (the true Damerau–Levenshtein
 * distance is 2; OSA may not edit a swapped pair again — the standard example of the difference,
 * from memory). The brute-force peer below enumerates single edits, independently of the dynamic
 * programme.
 */
import { describe, expect, it } from "vitest";
import { editDistance, nearestMatch } from "../../src/commands/nearest-match.js";
import { createSeededRng } from "../../src/ports/rng.js";

/** Every word one Damerau error away from `word`, over `alphabet`. */
function oneEditAway(word: string, alphabet: string): Set<string> {
  const out = new Set<string>();
  for (let i = 0; i <= word.length; i++) {
    for (const c of alphabet) out.add(word.slice(0, i) + c + word.slice(i));
    if (i < word.length) {
      out.add(word.slice(0, i) + word.slice(i + 1));
      for (const c of alphabet) out.add(word.slice(0, i) + c + word.slice(i + 1));
    }
    if (i + 1 < word.length) {
      out.add(word.slice(0, i) + word[i + 1] + word[i] + word.slice(i + 2));
    }
  }
  out.delete(word);
  return out;
}

describe("editDistance", () => {
  it.each([
    ["check", "check", 0],
    ["chek", "check", 1],
    ["chekc", "check", 1],
    ["hcek", "check", 2],
    ["kitten", "sitting", 3],
    ["ca", "abc", 3],
    ["", "help", 4],
    ["STATUS", "status", 0],
  ])("d(%j, %j) = %i", (a, b, d) => {
    expect(editDistance(a, b)).toBe(d);
    expect(editDistance(b, a)).toBe(d);
  });

  it("every single Damerau error is distance 1, as a brute-force enumeration says", () => {
    const rng = createSeededRng(14);
    for (let trial = 0; trial < 30; trial++) {
      const word = Array.from(
        { length: 3 + Math.floor(rng.next() * 5) },
        () => "abcd"[Math.floor(rng.next() * 4)],
      ).join("");
      for (const near of oneEditAway(word, "abcd")) expect(editDistance(word, near)).toBe(1);
    }
  });
});

describe("nearestMatch", () => {
  const commands = ["check", "me", "join", "leave", "explain", "status", "compare", "whatif"];

  it("offers the nearest command within two errors, and nothing farther", () => {
    expect(nearestMatch("chek", commands)).toBe("check");
    expect(nearestMatch("stauts", commands)).toBe("status");
    expect(nearestMatch("comprae", commands)).toBe("compare");
    expect(nearestMatch("frobnicate", commands)).toBeNull();
    expect(nearestMatch("chxxk", commands)).toBe("check");
    expect(nearestMatch("cxxxk", commands)).toBeNull();
  });

  it("short words get a suggestion only one error away", () => {
    expect(nearestMatch("m", commands)).toBe("me");
    expect(nearestMatch("xy", commands)).toBeNull();
  });
});
