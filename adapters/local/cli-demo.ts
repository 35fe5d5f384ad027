/**
 * @module cli-demo
 * `plumbline demo`: the invented scenario analysed end to end — the latest four weeks, then the
 * coordinator-led half against the rotating-hosts half. `--write-log FILE` saves the scenario's
 * log so the other commands can be tried on it.
 */
import { writeFile } from "node:fs/promises";
import { resolve } from "node:path";
import { buildLedgers } from "../../src/attention/channel-ledger.js";
import { parseDateRange } from "../../src/domain/date-range.js";
import { PlumblineError } from "../../src/domain/errors.js";
import { DAY_MS, DEFAULT_SETTINGS } from "../../src/domain/settings.js";
import { analyzeSnapshot } from "../../src/report/analyze-snapshot.js";
import { CAUTIONS_FULL } from "../../src/report/cautions.js";
import { compareBlocks } from "../../src/report/compare-blocks.js";
import { comparePeriods } from "../../src/report/compare-periods.js";
import { renderText } from "../../src/report/render-text.js";
import { summaryBlocks } from "../../src/report/summary-blocks.js";
import { parseCommandArgs } from "./cli-flags.js";
import type { CliIo } from "./cli-io.js";
import {
  DEMO_CHANNEL,
  DEMO_START,
  DEMO_SWITCH_WEEK,
  DEMO_WEEKS,
  demoDescription,
  demoEvents,
  demoLog,
} from "./demo-scenario.js";

function day(ms: number): string {
  return new Date(ms).toISOString().slice(0, 10);
}

export async function runDemo(argv: readonly string[], io: CliIo): Promise<number> {
  const parsed = parseCommandArgs(
    argv,
    { "write-log": { type: "string" }, json: { type: "boolean" } },
    "plumbline demo [--write-log FILE] [--json]",
  );
  const target = parsed.values["write-log"];
  if (typeof target === "string") {
    const path = resolve(io.cwd, target);
    await writeFile(path, demoLog());
    io.stdout(`Wrote the demo log to ${path}. Try: plumbline analyze ${target}\n`);
    return 0;
  }
  if (parsed.positionals.length > 0) {
    throw new PlumblineError("ARG_UNKNOWN", `unexpected argument "${parsed.positionals[0]}"`, {
      hint: "usage: plumbline demo [--write-log FILE]",
    });
  }
  const snapshot = buildLedgers(demoEvents()).get(DEMO_CHANNEL);
  if (!snapshot) throw new Error("demo scenario produced no channel");
  const split = DEMO_START + DEMO_SWITCH_WEEK * 7 * DAY_MS;
  const a = parseDateRange(`${day(DEMO_START)}..${day(split - DAY_MS)}`);
  const b = parseDateRange(`${day(split)}..${day(DEMO_START + DEMO_WEEKS * 7 * DAY_MS - DAY_MS)}`);
  const settings = DEFAULT_SETTINGS;
  const current = analyzeSnapshot(snapshot, settings, { until: b.until });
  const compare = comparePeriods(snapshot, settings, { a, b });
  if (parsed.values.json === true) {
    io.stdout(`${JSON.stringify({ analysis: current, compare }, null, 2)}\n`);
    return 0;
  }
  const out = [
    demoDescription(),
    "",
    "1. The channel now: the latest four weeks (rotating hosts)",
    "",
    renderText(summaryBlocks(current, { namesOn: true })),
    "",
    "2. Did the format change help? Coordinator-led weeks (A) against rotating hosts (B)",
    "",
    renderText(compareBlocks(compare)),
    "",
    "Before you use figures like these:",
    ...CAUTIONS_FULL.map((c) => `  - ${c}`),
    "",
    "Next: `npx plumbline demo --write-log demo.jsonl`, then `npx plumbline analyze demo.jsonl --json`.",
    "",
  ];
  io.stdout(out.join("\n"));
  return 0;
}
