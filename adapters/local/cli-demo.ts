/**
 * @module cli-demo
 * `plumbline demo`: the invented scenario replayed through the whole bot (see demo-replay.ts).
 * `--json` prints the analysis of the last four weeks and the compare of the two formats as report
 * objects instead; `--write-log FILE` saves the scenario's log so the other commands can be tried.
 */
import { writeFile } from "node:fs/promises";
import { resolve } from "node:path";
import { analyzeSnapshot } from "../../src/analysis/analyze-snapshot.js";
import { comparePeriods } from "../../src/analysis/compare-periods.js";
import { buildLedgers } from "../../src/attention/channel-ledger.js";
import { PlumblineError } from "../../src/domain/errors.js";
import { DEFAULT_SETTINGS } from "../../src/domain/settings.js";
import { parseCommandArgs } from "./cli-flags.js";
import type { CliIo } from "./cli-io.js";
import { runDemoReplay } from "./demo-replay.js";
import { DEMO_CHANNEL, demoEvents, demoLog, demoRanges } from "./demo-scenario.js";

const USAGE = "plumbline demo [--write-log FILE] [--json]";

export async function runDemo(argv: readonly string[], io: CliIo): Promise<number> {
  const parsed = parseCommandArgs(
    argv,
    { "write-log": { type: "string" }, json: { type: "boolean" } },
    USAGE,
  );
  if (parsed.positionals.length > 0) {
    throw new PlumblineError("ARG_UNKNOWN", `unexpected argument "${parsed.positionals[0]}"`, {
      hint: `usage: ${USAGE}`,
    });
  }
  const target = parsed.values["write-log"];
  if (typeof target === "string") {
    const path = resolve(io.cwd, target);
    await writeFile(path, demoLog());
    io.stdout(`Wrote the demo log to ${path}. Try: npx plumbline analyze ${target}\n`);
    return 0;
  }
  if (parsed.values.json === true) {
    const snapshot = buildLedgers(demoEvents()).get(DEMO_CHANNEL);
    if (!snapshot) throw new Error("the demo scenario produced no channel");
    const ranges = demoRanges();
    const analysis = analyzeSnapshot(snapshot, DEFAULT_SETTINGS, { until: ranges.b.until });
    const compare = comparePeriods(snapshot, DEFAULT_SETTINGS, ranges);
    io.stdout(`${JSON.stringify({ analysis, compare }, null, 2)}\n`);
    return 0;
  }
  const started = performance.now();
  const posts = await runDemoReplay((text) => io.stdout(text));
  const seconds = ((performance.now() - started) / 1000).toFixed(1);
  io.stderr(`demo: ${posts} posts and answers in ${seconds} s\n`);
  return 0;
}
