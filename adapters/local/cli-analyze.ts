/**
 * @module cli-analyze
 * `plumbline analyze`, `compare` and `whatif`: read a channel, run the one analysis, print the
 * readable summary with the cautions, or the report object with `--json`.
 */

import { type AnalysisJob, type ResultOf, runJob } from "../../src/analysis/analysis-job.js";
import { progressLine } from "../../src/analysis/progress-line.js";
import { poolSize, WorkerPool } from "../../src/analysis/worker-pool.js";
import { parseShare } from "../../src/commands/parse-input.js";
import { parseDateRange, windowAndPrevious } from "../../src/domain/date-range.js";
import { PlumblineError } from "../../src/domain/errors.js";
import type { AnalysisSettings } from "../../src/domain/settings.js";
import { compareBlocks, whatIfBlocks } from "../../src/report/compare-blocks.js";
import { disclosureInput } from "../../src/report/group-membership.js";
import { renderText } from "../../src/report/render-text.js";
import { summaryBlocks } from "../../src/report/summary-blocks.js";
import { ANALYSIS_OPTIONS, parseCommandArgs, parseUntil, settingsFromFlags } from "./cli-flags.js";
import type { CliIo } from "./cli-io.js";
import { loadChannel } from "./load-channel.js";

const SOURCE = "<log> | --db URL --channel C";

async function prepare(
  argv: readonly string[],
  io: CliIo,
  usage: string,
  extra: Record<string, { type: "string" }> = {},
  beforeLoad?: (settings: AnalysisSettings) => void,
) {
  const parsed = parseCommandArgs(argv, { ...ANALYSIS_OPTIONS, ...extra }, usage);
  const settings: AnalysisSettings = settingsFromFlags(parsed.values);
  const until =
    typeof parsed.values.until === "string" ? parseUntil(parsed.values.until) : undefined;
  beforeLoad?.(settings);
  const source = await loadChannel({
    parsed,
    io,
    usage,
    ...(until === undefined ? {} : { until }),
  });
  if (source.skipped > 0)
    io.stderr(`plumbline: skipped ${source.skipped} bad line(s) (--skip-bad)\n`);
  return { parsed, settings, until, snapshot: source.snapshot };
}

/**
 * Runs one job with a pool started for it (PLUMBLINE_WORKERS): an analysis here, its posterior
 * draws split over the pool's threads; compare and what-if as whole jobs on a worker. With the
 * progress line after 2 s.
 */
async function runOnPool<J extends AnalysisJob>(
  io: CliIo,
  job: J,
  pool = new WorkerPool({ size: poolSize(io.env) }),
): Promise<ResultOf<J>> {
  const now = io.now;
  const onProgress = now ? progressLine({ now, write: io.stderr }) : undefined;
  try {
    if (job.kind === "analyze" && !pool.inThread) {
      return runJob(
        job,
        onProgress,
        (plan, samples, meanwhile) =>
          pool.drawRangesSync(plan, samples, onProgress, undefined, meanwhile),
        (task, cumulative, strength) => pool.strengthRowsSync(task, cumulative, strength),
      );
    }
    return await pool.run(job, onProgress ? { onProgress } : {});
  } finally {
    await pool.close();
  }
}

function print(io: CliIo, json: boolean, value: unknown, text: () => string): void {
  io.stdout(json ? `${JSON.stringify(value, null, 2)}\n` : text());
}

export async function runAnalyze(argv: readonly string[], io: CliIo): Promise<number> {
  const usage = `plumbline analyze ${SOURCE} [flags] [--json]`;
  // The draws' workers start loading while this thread reads the log (one core is idle then);
  // runOnPool closes the pool, and so does the catch below when reading fails.
  const started: { pool?: WorkerPool } = {};
  const { parsed, settings, until, snapshot } = await prepare(argv, io, usage, {}, (settings) => {
    if (settings.samples === 0) return;
    started.pool = new WorkerPool({ size: poolSize(io.env) });
    started.pool.warm();
  }).catch(async (error: unknown) => {
    await started.pool?.close();
    throw error;
  });
  const report = await runOnPool(
    io,
    { kind: "analyze", snapshot, settings, ...(until === undefined ? {} : { until }) },
    started.pool,
  );
  print(io, parsed.values.json === true, report, () =>
    // The JSON keeps every figure for the operator; the text follows the chat's disclosure rules
    // as a facilitator outside the channel's members would read them privately.
    renderText(
      summaryBlocks(report, {
        namesOn: true,
        reader: "(operator)",
        disclosure: disclosureInput({
          snapshot,
          report,
          minMembers: settings.minMembers,
          facilitator: true,
        }),
      }),
    ),
  );
  return 0;
}

export async function runCompare(argv: readonly string[], io: CliIo): Promise<number> {
  const usage = `plumbline compare ${SOURCE} --a YYYY-MM-DD..YYYY-MM-DD --b YYYY-MM-DD..YYYY-MM-DD [flags] [--json]`;
  const { parsed, settings, snapshot } = await prepare(argv, io, usage, {
    a: { type: "string" },
    b: { type: "string" },
  });
  const rawA = parsed.values.a;
  const rawB = parsed.values.b;
  let ranges: { a: ReturnType<typeof parseDateRange>; b: ReturnType<typeof parseDateRange> };
  if (typeof rawA === "string" && typeof rawB === "string") {
    ranges = { a: parseDateRange(rawA), b: parseDateRange(rawB) };
  } else if (rawA === undefined && rawB === undefined) {
    const end =
      typeof parsed.values.until === "string"
        ? parseUntil(parsed.values.until)
        : snapshot.lastEventAt;
    if (end === null)
      throw new PlumblineError("ARG_MISSING", "the channel has no events", {
        hint: "check the log",
      });
    const [a, b] = windowAndPrevious(end, settings.windowDays);
    ranges = { a, b };
  } else {
    throw new PlumblineError(
      "ARG_MISSING",
      "give both --a and --b, or neither (the last --window days against the same number of days before)",
      { hint: `usage: ${usage}` },
    );
  }
  const result = await runOnPool(io, { kind: "compare", snapshot, settings, ranges });
  print(io, parsed.values.json === true, result, () => renderText(compareBlocks(result)));
  return 0;
}

export async function runWhatIf(argv: readonly string[], io: CliIo): Promise<number> {
  const usage = `plumbline whatif ${SOURCE} --cap SHARE [flags] [--json]`;
  const { parsed, settings, until, snapshot } = await prepare(argv, io, usage, {
    cap: { type: "string" },
  });
  const raw = parsed.values.cap;
  if (typeof raw !== "string")
    throw new PlumblineError("ARG_MISSING", "whatif needs --cap", {
      hint: "for example --cap 0.25",
    });
  // The same values as the chat's `whatif cap`: a share above 0 and at most 1, as 0.25 or 25%.
  const cap = parseShare(raw);
  if (cap === null || !(cap > 0 && cap <= 1)) {
    throw new PlumblineError("ARG_BAD_VALUE", `--cap ${JSON.stringify(raw)} is not a share`, {
      hint: "give a share above 0 and at most 1, for example 0.25 or 25%",
    });
  }
  const result = await runOnPool(io, {
    kind: "whatif",
    snapshot,
    settings,
    cap,
    ...(until === undefined ? {} : { until }),
  });
  print(io, parsed.values.json === true, result, () => renderText(whatIfBlocks(result)));
  return 0;
}
