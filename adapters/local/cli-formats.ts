/**
 * @module cli-formats
 * `plumbline formats <log> | --db URL --channel C [--a FORMAT --b FORMAT] [flags] [--json]`: each
 * format's figures on its own periods, the chance that B is more balanced than A, and the time
 * warning (src/analysis/compare-formats.ts). Without --a/--b the two first formats are compared.
 */
import { compareFormats } from "../../src/analysis/compare-formats.js";
import { PlumblineError } from "../../src/domain/errors.js";
import type { AnalysisSettings } from "../../src/domain/settings.js";
import { formatsBlocks } from "../../src/report/format-blocks.js";
import { renderText } from "../../src/report/render-text.js";
import { ANALYSIS_OPTIONS, parseCommandArgs, parseUntil, settingsFromFlags } from "./cli-flags.js";
import type { CliIo } from "./cli-io.js";
import { loadChannel } from "./load-channel.js";

export async function runFormats(argv: readonly string[], io: CliIo): Promise<number> {
  const usage =
    "plumbline formats <log> | --db URL --channel C [--a FORMAT --b FORMAT] [flags] [--json]";
  const parsed = parseCommandArgs(
    argv,
    { ...ANALYSIS_OPTIONS, a: { type: "string" }, b: { type: "string" } },
    usage,
  );
  const settings: AnalysisSettings = settingsFromFlags(parsed.values);
  const given =
    typeof parsed.values.until === "string" ? parseUntil(parsed.values.until) : undefined;
  const source = await loadChannel({
    parsed,
    io,
    usage,
    ...(given === undefined ? {} : { until: given }),
  });
  if (source.skipped > 0)
    io.stderr(`plumbline: skipped ${source.skipped} bad line(s) (--skip-bad)\n`);
  const { snapshot } = source;
  const until = given ?? snapshot.lastEventAt;
  if (until === null) {
    throw new PlumblineError("ARG_MISSING", "the channel has no events", { hint: "check the log" });
  }
  const a = parsed.values.a;
  const b = parsed.values.b;
  if ((typeof a === "string") !== (typeof b === "string")) {
    throw new PlumblineError("ARG_MISSING", "give both --a and --b, or neither", {
      hint: `usage: ${usage}`,
    });
  }
  const report = compareFormats(snapshot, settings, {
    until,
    ...(typeof a === "string" && typeof b === "string" ? { pair: [a, b] as const } : {}),
  });
  if (typeof a === "string" && typeof b === "string") {
    const known = report.formats.map((f) => f.format);
    const missing = [a, b].find((x) => !known.includes(x));
    if (missing !== undefined) {
      throw new PlumblineError("ARG_BAD_VALUE", `there is no format "${missing}" in the channel`, {
        hint: `the formats are ${known.length > 0 ? known.join(", ") : "none yet"}`,
      });
    }
  }
  io.stdout(
    parsed.values.json === true
      ? `${JSON.stringify(report, null, 2)}\n`
      : renderText(formatsBlocks(report)),
  );
  return 0;
}
