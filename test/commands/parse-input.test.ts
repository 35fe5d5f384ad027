/**
 * Member arguments in the forms chat platforms send (Slack's escaped mentions `<@U123>` and
 * `<@U123|name>`, as documented in Slack's "Formatting text for app surfaces" guide; typed
 * `@U123`; a bare id) and shares as fractions or percentages.
 */
import { describe, expect, it } from "vitest";
import { parseMember, parseShare, words } from "../../src/commands/parse-input.js";
import { isPlumblineError } from "../../src/domain/errors.js";

describe("parseMember", () => {
  it.each([
    ["<@U123ABC>", "U123ABC"],
    ["<@U123ABC|ana>", "U123ABC"],
    ["@U123ABC", "U123ABC"],
    ["U123ABC", "U123ABC"],
    ["29:1a2b-teams-id", "29:1a2b-teams-id"],
    ["zoë", "zoë"],
    ["00000000-0000-4000-8000-00000000000a", "00000000-0000-4000-8000-00000000000a"],
  ])("%s → %s", (word, id) => {
    expect(parseMember(word, "group <member> <label>")).toBe(id);
  });

  it.each([
    undefined,
    "",
    "<@>",
    "@",
    "<@U1|x",
    "a<b",
    "😀",
    "@😀",
    "ana😀",
    "ana\u001b[2J",
    "C\u0000Z",
    "x".repeat(200),
  ])("rejects %j with a coded error", (word) => {
    let caught: unknown = null;
    try {
      parseMember(word, "facilitator add <member>");
    } catch (error) {
      caught = error;
    }
    expect(isPlumblineError(caught)).toBe(true);
    if (isPlumblineError(caught)) expect(["ARG_MISSING", "ARG_BAD_VALUE"]).toContain(caught.code);
  });

  it("refuses an emoji for `facilitator add` with ARG_BAD_VALUE and a hint to mention", () => {
    expect(() => parseMember("😀", "facilitator add <member>")).toThrow(
      expect.objectContaining({
        code: "ARG_BAD_VALUE",
        hint: expect.stringContaining("/influence facilitator add <member>"),
      }),
    );
  });
});

describe("parseShare and words", () => {
  it.each([
    ["0.25", 0.25],
    [".3", 0.3],
    ["30%", 0.3],
    ["12.5%", 0.125],
    ["1", 1],
  ])("%s → %d", (word, value) => {
    expect(parseShare(word)).toBeCloseTo(value, 12);
  });

  it.each(["", "abc", "-0.2", "30 %", "1e-1", "0.2.3"])("%j is not a share", (word) => {
    expect(parseShare(word)).toBeNull();
  });

  it("splits on any white space", () => {
    expect(words("  set\tdigest   monday 09:00 ")).toEqual(["set", "digest", "monday", "09:00"]);
    expect(words("   ")).toEqual([]);
  });
});
