/**
 * `plumbline report`: writes one self-contained HTML file from a log, with a compare when both
 * ranges are given, and refuses a missing --out or a lone range with the fix.
 */
import { mkdtempSync, readFileSync } from "node:fs";
import { tmpdir } from "node:os";
import { join } from "node:path";
import { describe, expect, it } from "vitest";
import { runReport } from "../../adapters/local/cli-report.js";
import { mentionEvents, writeLog } from "../report/log-builders.js";
import { COUNTED_IDS, consentOf, FIXTURE_PAIRS } from "./chart-fixtures.js";

function io(cwd: string) {
  const out: string[] = [];
  const err: string[] = [];
  return {
    out,
    err,
    io: { stdout: (t: string) => out.push(t), stderr: (t: string) => err.push(t), env: {}, cwd },
  };
}

describe("plumbline report", () => {
  const log = writeLog(mentionEvents(FIXTURE_PAIRS, { consent: consentOf }));

  it("writes the page with the operator's view and a compare", async () => {
    const dir = mkdtempSync(join(tmpdir(), "plumbline-report-"));
    const { out, io: cliIo } = io(dir);
    const code = await runReport(
      [
        log,
        "--out",
        "r.html",
        "--samples",
        "100",
        "--seed",
        "3",
        "--a",
        "2026-10-01..2026-10-28",
        "--b",
        "2026-10-29..2026-11-25",
        // Six members, two named: k = 3 leaves enough unnamed for shares (DESIGN.md §7).
        "--min-members",
        "3",
      ],
      cliIo,
      { now: () => Date.UTC(2026, 11, 1) },
    );
    expect(code).toBe(0);
    expect(out.join("")).toContain(join(dir, "r.html"));
    const html = readFileSync(join(dir, "r.html"), "utf8");
    expect(html.startsWith("<!doctype html>")).toBe(true);
    expect(html).toContain('data-chart="compare"');
    expect(html).toContain("ana-named");
    for (const id of COUNTED_IDS) expect(html).not.toContain(id);
  });

  it("needs --out, and both ranges or neither", async () => {
    const { io: cliIo } = io(tmpdir());
    await expect(runReport([log], cliIo)).rejects.toMatchObject({ code: "ARG_MISSING" });
    await expect(
      runReport([log, "--out", "x.html", "--a", "2026-10-01..2026-10-28"], cliIo),
    ).rejects.toMatchObject({ code: "ARG_MISSING" });
    await expect(
      runReport([log, "--out", "x.html", "--colour", "red"], cliIo),
    ).rejects.toMatchObject({ code: "ARG_UNKNOWN" });
  });
});
