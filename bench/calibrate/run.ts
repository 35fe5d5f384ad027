/**
 * @module calibrate
 * Entry of `npm run calibrate` (never part of `npm test`): simulates channels from known attention
 * matrices (true-matrix.ts, simulate-channel.ts), analyses each with the product path
 * (`analyzeSnapshot`, default settings), and prints per cell the coverage, leader, bias and note
 * rates with PASS/MISSED against DESIGN.md §4's floor and whether the goal is met. A progress line
 * goes to stderr. `--from A.json,B.json` prints saved `--json` runs again, merged (e.g. as `--markdown`). Exit 0 unless `--strict` and a cell misses the floor (2 on a bad option).
 */
import { execFileSync } from "node:child_process";
import { readFileSync } from "node:fs";
import { availableParallelism, cpus, loadavg } from "node:os";
import { isPlumblineError } from "../../src/domain/errors.js";
import { DEFAULT_SETTINGS } from "../../src/domain/settings.js";
import { markdownTable, textTable } from "./format-table.js";
import { DECAYS } from "./measure-channel.js";
import {
  type CalibrationPlan,
  DEFAULT_CHANNELS_TEXT,
  type OutputFormat,
  parsePlan,
  USAGE,
} from "./plan.js";
import { runPlan } from "./run-jobs.js";
import type { CellSummary } from "./summarize-cell.js";
import { REGIMES } from "./true-matrix.js";

function commit(): string {
  try {
    const hash = execFileSync("git", ["rev-parse", "--short", "HEAD"], { encoding: "utf8" }).trim();
    const dirty = execFileSync("git", ["status", "--porcelain", "--", "src"], {
      encoding: "utf8",
    }).trim();
    return dirty ? `${hash} (src/ modified)` : hash;
  } catch {
    return "unknown";
  }
}

function header(plan: CalibrationPlan, seconds: number, revision: string): string[] {
  return [
    `date ${new Date().toISOString().slice(0, 10)}, commit ${revision}, node ${process.version}, ${cpus().length} × ${cpus()[0]?.model ?? "cpu"}, load ${loadavg()[0].toFixed(2)}, ${plan.workers} worker(s), ${seconds.toFixed(0)} s`,
    `product settings: the defaults ${JSON.stringify(DEFAULT_SETTINGS)}${Object.keys(plan.overrides).length > 0 ? `, with ${JSON.stringify(plan.overrides)}` : ""}, except halfLifeDays 0 in "none" cells and clusters off`,
    `suite: seed ${plan.seed}, channels per cell ${plan.channels ?? DEFAULT_CHANNELS_TEXT}`,
  ];
}

/** Cells of several saved runs in table order: n, N/n, regime, decay. */
function sortCells(cells: CellSummary[]): CellSummary[] {
  const regime = (c: CellSummary) => REGIMES.indexOf(c.regime);
  const decay = (c: CellSummary) => DECAYS.indexOf(c.decay);
  return [...cells].sort(
    (a, b) => a.n - b.n || a.ratio - b.ratio || regime(a) - regime(b) || decay(a) - decay(b),
  );
}

/** Prints a run (fresh or read back from `--from`) in the plan's format. */
function print(format: OutputFormat, lines: readonly string[], summaries: CellSummary[]): void {
  if (format === "json") {
    process.stdout.write(`${JSON.stringify({ header: lines, cells: summaries }, null, 2)}\n`);
  } else if (format === "markdown") {
    process.stdout.write(
      `${lines.map((l) => `${l}  `).join("\n")}\n\n${markdownTable(summaries)}\n`,
    );
  } else {
    process.stdout.write(`${lines.join("\n")}\n\n${textTable(summaries)}\n`);
  }
}

async function main(): Promise<number> {
  let parsed: ReturnType<typeof parsePlan>;
  try {
    parsed = parsePlan(process.argv.slice(2), availableParallelism());
  } catch (error) {
    if (isPlumblineError(error)) {
      process.stderr.write(
        `${error.code}: ${error.message}${error.hint ? ` (${error.hint})` : ""}\n`,
      );
      return 2;
    }
    throw error;
  }
  if (parsed.help) {
    process.stdout.write(`${USAGE}\n`);
    return 0;
  }
  const { plan } = parsed;
  if (plan.from.length > 0) {
    const saved = plan.from.map(
      (path) =>
        JSON.parse(readFileSync(path, "utf8")) as { header: string[]; cells: CellSummary[] },
    );
    const lines =
      saved.length === 1
        ? saved[0].header
        : saved.flatMap((run, k) => run.header.map((l) => `part ${k + 1}: ${l}`));
    const cells = sortCells(saved.flatMap((run) => run.cells));
    print(plan.format, lines, cells);
    return plan.strict && cells.some((s) => !s.floor.met) ? 1 : 0;
  }
  const revision = commit(); // taken at the start: the code that ran
  const started = performance.now();
  const tty = process.stderr.isTTY;
  let lastPrinted = 0;
  const summaries = await runPlan(plan, (done, total, job) => {
    const now = performance.now();
    if (done < total && now - lastPrinted < (tty ? 250 : 10_000)) return;
    lastPrinted = now;
    const elapsed = (now - started) / 1000;
    const text = `calibrate: ${done}/${total} channels (last ${job.regime} n=${job.n} N/n=${job.ratio}), ${elapsed.toFixed(0)} s`;
    process.stderr.write(tty ? `\r${text}\x1b[K` : `${text}\n`);
  });
  if (tty) process.stderr.write("\n");
  print(plan.format, header(plan, (performance.now() - started) / 1000, revision), summaries);
  return plan.strict && summaries.some((s) => !s.floor.met) ? 1 : 0;
}

main().then(
  (code) => {
    process.exitCode = code;
  },
  (error: unknown) => {
    if (isPlumblineError(error)) {
      // A setting the product refuses (e.g. --set background=-1): one line with its code (the
      // product's messages already name the fix).
      process.stderr.write(`${error.code}: ${error.message}\n`);
      process.exitCode = 2;
      return;
    }
    process.stderr.write(`${error instanceof Error ? error.stack : String(error)}\n`);
    process.exitCode = 1;
  },
);
