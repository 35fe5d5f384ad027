/**
 * @module cli-report
 * `plumbline report <log> | --db URL --channel C --out FILE [--a RANGE --b RANGE] [flags]`: writes
 * the report as one self-contained HTML file (inline CSS and SVG, no network), with the figures,
 * the charts, the weekly history, an optional compare and the how to read. The operator's view:
 * members who consented to be named are named, everyone else is "member k" (as `analyze`).
 */
import { writeFileSync } from "node:fs";
import { resolve } from "node:path";
import { type DateRange, parseDateRange } from "../../src/domain/date-range.js";
import { PlumblineError } from "../../src/domain/errors.js";
import { analyzeForPage } from "../../src/report/charts/page-analysis.js";
import { disclosureInput } from "../../src/report/group-membership.js";
import { reportPage } from "../../src/report/report-page.js";
import { ANALYSIS_OPTIONS, parseCommandArgs, parseUntil, settingsFromFlags } from "./cli-flags.js";
import type { CliIo } from "./cli-io.js";
import { loadChannel } from "./load-channel.js";

const USAGE =
  "plumbline report <log> | --db URL --channel C --out FILE [--a YYYY-MM-DD..YYYY-MM-DD --b YYYY-MM-DD..YYYY-MM-DD] [flags]";

/** Runs `plumbline report`; returns the exit code. `now` (epoch ms) stamps the page. */
export async function runReport(
  argv: readonly string[],
  io: CliIo,
  options: { now?: () => number } = {},
): Promise<number> {
  const parsed = parseCommandArgs(
    argv,
    { ...ANALYSIS_OPTIONS, out: { type: "string" }, a: { type: "string" }, b: { type: "string" } },
    USAGE,
  );
  const out = parsed.values.out;
  if (typeof out !== "string" || out.trim() === "") {
    throw new PlumblineError("ARG_MISSING", "report needs --out FILE", {
      hint: "for example --out report.html",
    });
  }
  const rawA = parsed.values.a;
  const rawB = parsed.values.b;
  let ranges: { a: DateRange; b: DateRange } | undefined;
  if (typeof rawA === "string" && typeof rawB === "string") {
    ranges = { a: parseDateRange(rawA), b: parseDateRange(rawB) };
  } else if (rawA !== undefined || rawB !== undefined) {
    throw new PlumblineError("ARG_MISSING", "give both --a and --b for a compare, or neither", {
      hint: `usage: ${USAGE}`,
    });
  }
  const settings = settingsFromFlags(parsed.values);
  const until =
    typeof parsed.values.until === "string" ? parseUntil(parsed.values.until) : undefined;
  const source = await loadChannel({
    parsed,
    io,
    usage: USAGE,
    ...(until === undefined ? {} : { until }),
  });
  if (source.skipped > 0) {
    io.stderr(`plumbline: skipped ${source.skipped} bad line(s) (--skip-bad)\n`);
  }
  const analysis = analyzeForPage(source.snapshot, settings, {
    ...(until === undefined ? {} : { until }),
    ...(ranges ? { ranges } : {}),
  });
  const html = reportPage({
    ...analysis,
    // As a facilitator outside the channel's members would read it (DESIGN.md §7).
    policy: {
      namesOn: true,
      reader: "(operator)",
      disclosure: disclosureInput({
        snapshot: source.snapshot,
        report: analysis.report,
        minMembers: settings.minMembers,
        facilitator: true,
      }),
    },
    generatedAt: (options.now ?? Date.now)(),
  });
  const path = resolve(io.cwd, out);
  try {
    writeFileSync(path, html, "utf8");
  } catch (error) {
    throw new PlumblineError("ARG_BAD_VALUE", `cannot write ${path}`, {
      hint: "give --out a path in a folder that exists and that you may write to",
      cause: error,
    });
  }
  io.stdout(`plumbline: wrote ${path} (${Math.ceil(Buffer.byteLength(html) / 1024)} KB)\n`);
  return 0;
}
