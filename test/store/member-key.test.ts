/**
 * The member id key (src/store/member-key.ts) on its own: what counts as the key text, the length
 * rule at its edge, and the HMAC step against RFC 4231's published test vector. A key read
 * differently from a file than from the environment would key the same member twice.
 */
import { describe, expect, it } from "vitest";
import {
  createMemberKeyer,
  hmac128,
  keyFingerprint,
  keyParts,
  MIN_KEY_LENGTH,
} from "../../src/store/member-key.js";

const A = "a".repeat(40);
const B = "b".repeat(40);

describe("member id key", () => {
  it("HMAC-SHA256 matches RFC 4231 test case 2, cut to its first 128 bits", () => {
    // Krawczyk et al., RFC 4231 (2005), §4.3: key "Jefe", data "what do ya want for nothing?".
    expect(hmac128("Jefe", "what do ya want for nothing?")).toBe(
      "5bdcc146bf60754e6a042426089575c7",
    );
  });

  it("one secret per non-empty line, trimmed: spaces and CRLF give the same members", () => {
    expect(keyParts(`  ${A}\t\r\n\n${B}\n`)).toEqual([A, B]);
    const plain = createMemberKeyer(A);
    for (const written of [`${A}\n`, `${A}\r\n`, `  ${A}  `, `\n${A}\n\n`]) {
      expect(createMemberKeyer(written)("U1")).toBe(plain("U1"));
      expect(keyFingerprint(written)).toBe(keyFingerprint(A));
    }
    // A chain applies its secrets in order: the second line keys the first one's output.
    expect(createMemberKeyer(`${A}\n${B}`)("U1")).toBe(hmac128(B, hmac128(A, "U1")));
    expect(keyFingerprint(`${A}\n${B}`)).not.toBe(keyFingerprint(A));
  });

  it(`accepts exactly ${MIN_KEY_LENGTH} characters and refuses one fewer, naming the length and the fix`, () => {
    expect(keyParts("k".repeat(MIN_KEY_LENGTH))).toEqual(["k".repeat(MIN_KEY_LENGTH)]);
    let error: unknown;
    try {
      keyParts(`${A}\n${"k".repeat(MIN_KEY_LENGTH - 1)}`);
    } catch (e) {
      error = e;
    }
    expect(error).toMatchObject({
      code: "STORE_NO_ID_KEY",
      message: "the member id key is 31 characters; at least 32 are needed",
      hint: "set PLUMBLINE_ID_KEY to a long random value, e.g. `openssl rand -hex 32`",
    });
    for (const empty of ["", "\n", "  \r\n  "]) {
      expect(() => keyParts(empty)).toThrow("the member id key is 0 characters");
    }
  });
});
