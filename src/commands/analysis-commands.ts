/**
 * @module analysis-commands
 * The commands that read the channel's figures: `check` (private; `check post` in the channel,
 * facilitators only), `me`, `compare [A B]` and `whatif cap <share>`. Every one analyses the
 * channel at `now` with the channel's own settings (DESIGN.md §4).
 */

import { type AnalyzeJob, inThreadRunner } from "../analysis/analysis-job.js";
import type { Block } from "../domain/blocks.js";
import { analysisSettingsFor, type ChannelSettings } from "../domain/channel-settings.js";
import { type DateRange, parseDateRange, windowAndPrevious } from "../domain/date-range.js";
import { PlumblineError } from "../domain/errors.js";
import type { LedgerSnapshot } from "../domain/ledger.js";
import type { AnalysisReport } from "../domain/report.js";
import { compareBlocks, whatIfBlocks } from "../report/compare-blocks.js";
import { EXPLAIN_POINTER } from "../report/digest-blocks.js";
import { commandUsage } from "../report/help-text.js";
import { meBlocks } from "../report/member-blocks.js";
import { summaryBlocks } from "../report/summary-blocks.js";
import { readChannelSettings } from "./channel-settings-store.js";
import type { CommandContext, CommandDeps, CommandResponse } from "./command-types.js";
import { consentAt, namingPolicy, readerId, snapshotIds } from "./member-view.js";
import { parseShare } from "./parse-input.js";
import { isFacilitator, refusal } from "./permissions.js";
import { respond, respondNotes } from "./respond.js";

/** What an analysis command starts from. */
export interface ChannelView {
  readonly settings: ChannelSettings;
  readonly snapshot: LedgerSnapshot;
  readonly report: AnalysisReport;
}

function runner(deps: CommandDeps) {
  return deps.analysis ?? inThreadRunner;
}

/** The channel's settings, snapshot and report at `now`. */
export async function viewChannel(
  context: CommandContext,
  deps: CommandDeps,
): Promise<ChannelView> {
  const settings = await readChannelSettings(deps.store, context.channel);
  const job = {
    kind: "analyze" as const,
    settings: analysisSettingsFor(settings),
    until: context.now,
  };
  const analysis = deps.analysis;
  if (analysis?.runShared !== undefined) {
    // Askers at once share one snapshot load and one analysis.
    const { result, snapshot } = await analysis.runShared<AnalyzeJob>(job, context.channel, () =>
      deps.store.loadSnapshot(context.channel),
    );
    return { settings, snapshot, report: result };
  }
  const snapshot = await deps.store.loadSnapshot(context.channel);
  const report = await runner(deps).run({ ...job, snapshot });
  return { settings, snapshot, report };
}

/** `check` and `check post`. */
export async function check(
  context: CommandContext,
  deps: CommandDeps,
  args: readonly string[],
): Promise<CommandResponse | null> {
  const post = args.length === 1 && args[0].toLowerCase() === "post";
  if (args.length > 0 && !post) return null;
  const facilitator = await isFacilitator(context, deps);
  if (post) {
    if (!facilitator)
      return respondNotes(await refusal("post the figures in the channel", context, deps));
    if (context.inThread) {
      return respondNotes(
        "A posted check goes to the whole channel, so run /influence check post in the channel itself, not in a thread.",
      );
    }
  }
  const { settings, snapshot, report } = await viewChannel(context, deps);
  if (post) {
    const policy = await namingPolicy({
      report,
      deps,
      namesOn: settings.names,
      disclosure: { snapshot, minMembers: settings.minMembers },
    });
    const blocks: Block[] = [
      ...summaryBlocks(report, policy),
      { kind: "footer", text: `Posted by a facilitator. ${EXPLAIN_POINTER}` },
    ];
    return respond(blocks, "channel");
  }
  const reader = { id: readerId(deps.store, snapshot, context.member), platformId: context.member };
  const policy = await namingPolicy({
    report,
    deps,
    namesOn: facilitator || settings.names,
    reader,
    disclosure: { snapshot, minMembers: settings.minMembers, facilitator },
  });
  return respond([
    ...summaryBlocks(report, policy),
    { kind: "footer", text: `Shown only to you. ${EXPLAIN_POINTER}` },
  ]);
}

/** `me`: the member's own figures. */
export async function me(context: CommandContext, deps: CommandDeps): Promise<CommandResponse> {
  const { snapshot, report } = await viewChannel(context, deps);
  const consent = consentAt(snapshot, snapshotIds(deps.store, context.member), context.now);
  return respond(
    meBlocks({ report, reader: readerId(deps.store, snapshot, context.member), consent }),
  );
}

/** `compare [A B]`: two periods, by default this window against the one before. */
export async function compare(
  context: CommandContext,
  deps: CommandDeps,
  args: readonly string[],
): Promise<CommandResponse> {
  const settings = await readChannelSettings(deps.store, context.channel);
  let ranges: { a: DateRange; b: DateRange };
  if (args.length === 0) {
    const [a, b] = windowAndPrevious(context.now, settings.windowDays);
    ranges = { a, b };
  } else if (args.length === 2) {
    ranges = { a: parseDateRange(args[0]), b: parseDateRange(args[1]) };
  } else {
    throw new PlumblineError(
      "ARG_BAD_VALUE",
      `compare takes two periods, or none; you gave ${args.length === 1 ? "one" : args.length}. ${commandUsage("compare")}`,
    );
  }
  const snapshot = await deps.store.loadSnapshot(context.channel);
  const result = await runner(deps).run({
    kind: "compare",
    snapshot,
    settings: analysisSettingsFor(settings),
    ranges,
  });
  return respond([...compareBlocks(result), { kind: "footer", text: EXPLAIN_POINTER }]);
}

/** `whatif cap <share>`. */
export async function whatIf(
  context: CommandContext,
  deps: CommandDeps,
  args: readonly string[],
): Promise<CommandResponse | null> {
  if (args.length === 0 || args[0].toLowerCase() !== "cap") return null;
  const cap = args.length === 2 ? parseShare(args[1]) : null;
  if (cap === null || !(cap > 0 && cap <= 1)) {
    throw new PlumblineError(
      "ARG_BAD_VALUE",
      `whatif cap takes one share above 0 and at most 1${args[1] === undefined ? "" : `, not "${args.slice(1).join(" ")}"`}`,
      { hint: "write, for example, /influence whatif cap 0.25 or /influence whatif cap 25%" },
    );
  }
  const settings = await readChannelSettings(deps.store, context.channel);
  const snapshot = await deps.store.loadSnapshot(context.channel);
  const result = await runner(deps).run({
    kind: "whatif",
    snapshot,
    settings: analysisSettingsFor(settings),
    cap,
    until: context.now,
  });
  return respond([...whatIfBlocks(result), { kind: "footer", text: EXPLAIN_POINTER }]);
}
