/**
 * `plumbline formats`: the demo's two tagged format periods compared from the log and from the
 * store (--db … --channel C) give the same report; each format's figure is the analysis of its
 * own period as a window without decay; bad names get a clear error.
 */
import { mkdtempSync } from "node:fs";
import { tmpdir } from "node:os";
import { join } from "node:path";
import { describe, expect, it } from "vitest";
import { DEMO_CHANNEL, demoEvents } from "../../adapters/local/demo-scenario.js";
import { analyzeSnapshot } from "../../src/analysis/analyze-snapshot.js";
import { buildLedgers } from "../../src/attention/channel-ledger.js";
import { DAY_MS, DEFAULT_SETTINGS } from "../../src/domain/settings.js";
import { writeLog } from "../report/log-builders.js";
import { runCli } from "./run-cli.js";

function run(argv: string[]): Promise<{ code: number; out: string; err: string }> {
  return runCli(argv, { PLUMBLINE_ID_KEY: "a".repeat(64) });
}

const events = demoEvents();
const logPath = writeLog(events, "formats-demo.jsonl");

describe("plumbline formats", () => {
  it("compares the demo's coordinator-led and rotating-hosts periods", async () => {
    const { code, out, err } = await run([
      "formats",
      logPath,
      "--samples",
      "100",
      "--seed",
      "5",
      "--json",
    ]);
    expect(err).toBe("");
    expect(code).toBe(0);
    const report = JSON.parse(out);
    expect(report.formats.map((f: { format: string }) => f.format)).toEqual([
      "coordinator-led",
      "rotating-hosts",
    ]);
    expect(report.pair.verdict).toBe("b more balanced");
    // The first period's figure is the plain analysis of that period as its own window, no decay.
    const snapshot = buildLedgers(events).get(DEMO_CHANNEL);
    if (!snapshot) throw new Error("no demo channel");
    const first = report.periods[0];
    const start = Date.parse(first.start);
    const end = Date.parse(first.end);
    const plain = analyzeSnapshot(
      snapshot,
      {
        ...DEFAULT_SETTINGS,
        samples: 100,
        seed: 5,
        halfLifeDays: 0,
        windowDays: (end - start) / DAY_MS,
      },
      { until: end },
    );
    expect(first.balance).toBeCloseTo(plain.balance ?? Number.NaN, 6);
    expect(report.formats[0].balance.low).toBeLessThanOrEqual(report.formats[0].balance.value);
    const text = await run(["formats", logPath, "--samples", "50"]);
    expect(text.out).toContain(
      '"rotating-hosts" spread influence more evenly than "coordinator-led"',
    );
    expect(text.out).toContain("Caution:");
  });

  it("reads the store as the log, and names an unknown format", async () => {
    const dir = mkdtempSync(join(tmpdir(), "plumbline-formats-"));
    const db = `sqlite:${join(dir, "f.db")}`;
    const ingested = await run(["ingest", logPath, "--db", db]);
    expect(ingested.code).toBe(0);
    const fromStore = await run([
      "formats",
      "--db",
      db,
      "--channel",
      DEMO_CHANNEL,
      "--samples",
      "50",
      "--json",
    ]);
    const fromLog = await run(["formats", logPath, "--samples", "50", "--json"]);
    expect(fromStore.err).toBe("");
    const a = JSON.parse(fromStore.out);
    const b = JSON.parse(fromLog.out);
    expect(a.formats.map((f: { balance: { value: number } }) => f.balance.value)).toEqual(
      b.formats.map((f: { balance: { value: number } }) => f.balance.value),
    );
    const bad = await run(["formats", logPath, "--a", "nope", "--b", "rotating-hosts"]);
    expect(bad.code).toBe(2);
    expect(bad.err).toContain('there is no format "nope"');
    expect(bad.err).toContain("[ARG_BAD_VALUE]");
  });
});
