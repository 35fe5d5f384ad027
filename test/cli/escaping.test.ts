/**
 * Ids holding terminal escape sequences or NUL never reach the terminal raw: `analyze` (text and
 * JSON), the console and error lines print them as visible `\uXXXX` escapes. ESC [ 2 J is
 * ECMA-48's "erase in page" (CSI Ps J with Ps = 2, ECMA-48 5th edition 1991, §8.3.39); OSC
 * (ESC ]) sets a terminal's title in common practice (xterm's control sequences).
 */

import { describe, expect, it } from "vitest";
import { mentionEvents, mutualPairs, writeLog } from "../report/log-builders.js";
import { runCli } from "./run-cli.js";

const CLEAR = "\u001b[2J";
const NASTY = [`ana${CLEAR}`, "bo\u0000x", "cy\u001b]0;owned\u0007", "dee\u009b2J", "eve\u202e"];

function run(argv: string[]): Promise<{ code: number; out: string; err: string }> {
  return runCli(argv);
}

/** Any C0/C1 control but line feed, or the bidi override used above, left raw. */
function hasRawControl(text: string): boolean {
  return [...text].some((char) => {
    const n = char.codePointAt(0) ?? 0;
    return (n < 0x20 && n !== 0x0a) || (n >= 0x7f && n <= 0x9f) || n === 0x202e;
  });
}

const ties = NASTY.flatMap((a, i) => NASTY.slice(i + 1).map((b) => [a, b] as const));
const log = writeLog(mentionEvents(mutualPairs(ties, 3)), "nasty.jsonl");

describe("escaping in text output", () => {
  it("analyze names the members with their control characters escaped", async () => {
    const { code, out, err } = await run(["analyze", log, "--samples", "50"]);
    expect(err).toBe("");
    expect(code).toBe(0);
    expect(hasRawControl(out)).toBe(false);
    expect(out).toContain("ana\\u001b[2J");
    expect(out).toContain("bo\\u0000x");
    expect(out).toContain("dee\\u009b2J");
    expect(out).toContain("eve\\u202e");
  });

  it("analyze --json stays valid JSON with the same ids", async () => {
    const { code, out } = await run(["analyze", log, "--json", "--samples", "50"]);
    expect(code).toBe(0);
    expect(hasRawControl(out)).toBe(false);
    const report = JSON.parse(out) as { influence: { member: string }[] };
    expect(report.influence.map((r) => r.member).sort()).toEqual([...NASTY].sort());
  });

  it("an error naming a bad channel escapes it too", async () => {
    const { code, err } = await run(["analyze", log, "--channel", `x${CLEAR}`]);
    expect(code).toBe(2);
    expect(hasRawControl(err)).toBe(false);
    expect(err).toContain("\\u001b[2J");
  });
});
