/**
 * Exit codes of the CLI (common practice for command-line tools: 0 success, 2 a usage or input
 * error the user can fix, 1 anything else). An internal failure — here the output stream breaking
 * under the command, as with a closed pipe — gives exit 1 and one line asking for a report,
 * without a stack unless PLUMBLINE_DEBUG is set.
 */
import { mkdtempSync, rmSync, writeFileSync } from "node:fs";
import { tmpdir } from "node:os";
import { join } from "node:path";
import { afterAll, describe, expect, it } from "vitest";
import { main } from "../../adapters/local/cli.js";

const dir = mkdtempSync(join(tmpdir(), "plumbline-cli-exit-"));
afterAll(() => rmSync(dir, { recursive: true, force: true }));

function smallLog(): string {
  const members = ["ana", "bo", "cy", "dee", "eli", "fay"];
  const lines = members.map((m, i) =>
    JSON.stringify({
      type: "consent",
      at: `2026-11-02T09:0${i}:00Z`,
      channel: "c1",
      member: m,
      level: "counted",
    }),
  );
  for (let k = 0; k < 60; k++) {
    lines.push(
      JSON.stringify({
        type: "message",
        at: `2026-11-03T10:${String(k).padStart(2, "0")}:00Z`,
        channel: "c1",
        id: `m${k}`,
        author: members[k % 6],
        mentions: [members[(k + 1 + (k % 4)) % 6]],
      }),
    );
  }
  const file = join(dir, "small.jsonl");
  writeFileSync(file, `${lines.join("\n")}\n`);
  return file;
}

function brokenOutput(env: Record<string, string | undefined>) {
  const err: string[] = [];
  return {
    io: {
      stdout: () => {
        throw new Error("write EPIPE");
      },
      stderr: (s: string) => err.push(s),
      env,
      cwd: dir,
    },
    err,
  };
}

describe("CLI exit codes", () => {
  it("an internal error exits 1 with one line and no stack", async () => {
    const log = smallLog();
    const run = brokenOutput({});
    expect(await main(["analyze", log, "--samples", "20"], run.io)).toBe(1);
    const text = run.err.join("");
    expect(text).toBe(
      "plumbline: internal error: write EPIPE. Please report it with the command you ran.\n",
    );
  });

  it("PLUMBLINE_DEBUG adds the stack", async () => {
    const log = smallLog();
    const run = brokenOutput({ PLUMBLINE_DEBUG: "1" });
    expect(await main(["analyze", log, "--samples", "20"], run.io)).toBe(1);
    expect(run.err.join("")).toMatch(/internal error: write EPIPE[\s\S]*\n\s+at /);
  });

  it("the same command with working output exits 0, and a bad flag exits 2", async () => {
    const log = smallLog();
    const out: string[] = [];
    const io = { stdout: (s: string) => out.push(s), stderr: () => {}, env: {}, cwd: dir };
    expect(await main(["analyze", log, "--samples", "20"], io)).toBe(0);
    expect(out.join("").length).toBeGreaterThan(0);
    expect(await main(["analyze", log, "--samples", "-1"], io)).toBe(2);
  });
});
