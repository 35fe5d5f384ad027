/**
 * @module format-commands
 * Meeting formats in chat (DESIGN.md §6): `format <name>` starts a format period, `format end`
 * ends it, `format list` shows the periods and any trial (anyone may look), `format trial A B
 * weeks N [random [seed S]]` plans a trial, and `compare formats [A B]` compares them. Starting,
 * ending and planning are for facilitators; a refused or invalid request changes nothing.
 * A trial's plan is kept in the channel state `format-trial`; its week switches are format events
 * recorded when due (`applyTrialSwitches`, called by commands, the digest and the scheduler's
 * trial posts), so the ledger holds what actually ran; trial-posts.ts says what the scheduler
 * posts (each week's switch, the result).
 */
import { compareFormats, type FormatsReport } from "../analysis/compare-formats.js";
import {
  planTrial,
  type TrialPlan,
  trialEnd,
  trialEvents,
  trialFormatAt,
  WEEK_MS,
} from "../analysis/format-trial.js";
import { formatAt, formatPeriods } from "../attention/format-periods.js";
import type { Block } from "../domain/blocks.js";
import { analysisSettingsFor } from "../domain/channel-settings.js";
import { PlumblineError } from "../domain/errors.js";
import { ingest } from "../ingest/ingest.js";
import type { Store } from "../ports/store.js";
import { EXPLAIN_POINTER } from "../report/digest-blocks.js";
import { isoDay, probability } from "../report/format.js";
import { formatsBlocks } from "../report/format-blocks.js";
import { readChannelSettings } from "./channel-settings-store.js";
import { commandOccurrence } from "./command-keys.js";
import type { CommandContext, CommandDeps, CommandResponse } from "./command-types.js";
import { isFacilitator, refusal } from "./permissions.js";
import { respond, respondNotes } from "./respond.js";

/** Longest format name accepted. */
export const MAX_FORMAT_NAME = 40;
const RESERVED = new Set(["end", "list", "trial"]);

function checkName(name: string): string {
  if (name.length === 0 || name.length > MAX_FORMAT_NAME || /[\p{Cc}<>\s]/u.test(name)) {
    throw new PlumblineError(
      "ARG_BAD_VALUE",
      `a format name is one word of up to ${MAX_FORMAT_NAME} characters without < or >`,
      { hint: "use a short name such as written-first or rotating-hosts" },
    );
  }
  if (RESERVED.has(name.toLowerCase())) {
    throw new PlumblineError("ARG_BAD_VALUE", `"${name}" is a command word, not a format name`, {
      hint: "use a short name such as written-first or rotating-hosts",
    });
  }
  return name;
}

/** The channel's stored trial plan, or null (a damaged record reads as none). */
export async function readTrial(store: Store, channel: string): Promise<StoredTrial | null> {
  const value = (await store.readChannelState(channel, "format-trial")) as StoredTrial | null;
  if (
    value === null ||
    typeof value !== "object" ||
    !value.plan ||
    !Array.isArray(value.plan.schedule)
  ) {
    return null;
  }
  return value;
}

export interface StoredTrial {
  readonly plan: TrialPlan;
  /** Switches already recorded (index into trialEvents). */
  readonly applied: number;
  /** Set once the result has been posted (a hint; the scheduler's claim posts it once). */
  readonly verdictPosted: boolean;
}

/** Records the trial's switches that are due by `now`; returns the trial (or null). */
export async function applyTrialSwitches(
  store: Store,
  channel: string,
  now: number,
): Promise<StoredTrial | null> {
  const trial = await readTrial(store, channel);
  if (trial === null) return null;
  const events = trialEvents(trial.plan, channel);
  let applied = trial.applied;
  while (applied < events.length && events[applied].at <= now) {
    await ingest(store, events[applied], `trial:${channel}:${trial.plan.start}:${applied}`, {
      receivedAt: now,
    });
    applied++;
  }
  if (applied === trial.applied) return trial;
  const next = { ...trial, applied };
  await store.writeChannelState(channel, "format-trial", next);
  return next;
}

/** One line for a digest: the current format, and how it compares with the previous one so far. */
export function currentFormatLine(
  report: FormatsReport,
  now: number,
  current: string | null,
): string | null {
  if (current === null) return null;
  const previous = [...report.periods]
    .reverse()
    .find((p) => p.format !== current && Date.parse(p.end) <= now);
  if (!previous) return `Format now: ${current}.`;
  const mine = report.formats.find((f) => f.format === current);
  const theirs = report.formats.find((f) => f.format === previous.format);
  if (!mine?.balance || !theirs?.balance || !report.pair) {
    return `Format now: ${current} (before it: ${previous.format}; too little data yet to compare them).`;
  }
  const pB =
    report.pair.b === current ? report.pair.pBMoreBalanced : 1 - report.pair.pBMoreBalanced;
  return `Format now: ${current}, balance so far ${mine.balance.value.toFixed(2)} against ${theirs.balance.value.toFixed(2)} under ${previous.format}; the chance it is more balanced is ${probability(pB)}.`;
}

/** The digest's format line for a channel at `now` (null when no format is running). */
export async function digestFormatLine(
  store: Store,
  channel: string,
  now: number,
): Promise<string | null> {
  await applyTrialSwitches(store, channel, now);
  const snapshot = await store.loadSnapshot(channel);
  const current = formatAt(snapshot.formats ?? [], now);
  if (current === null) return null;
  const periods = formatPeriods(snapshot.formats ?? [], now);
  const before = [...periods].reverse().find((p) => p.format !== current);
  const settings = await readChannelSettings(store, channel);
  const report = compareFormats(
    snapshot,
    { ...analysisSettingsFor(settings), samples: 100 },
    {
      until: now,
      ...(before ? { pair: [before.format, current] as const } : {}),
    },
  );
  return currentFormatLine(report, now, current);
}

/** `format <name>|end|list` and `format trial A B weeks N [random [seed S]]`. */
export async function format(
  context: CommandContext,
  deps: CommandDeps,
  args: readonly string[],
): Promise<CommandResponse | null> {
  if (args.length === 0) return null;
  const { store } = deps;
  const word = args[0].toLowerCase();
  await applyTrialSwitches(store, context.channel, context.now);
  if (word === "list" && args.length === 1) return listFormats(context, deps);
  if (!(await isFacilitator(context, deps))) {
    return respondNotes(await refusal("start or end formats", context, deps));
  }
  if (word === "trial") return trial(context, deps, args.slice(1));
  if (args.length > 1) return null;
  const snapshot = await store.loadSnapshot(context.channel);
  const current = formatAt(snapshot.formats ?? [], context.now);
  const running = await readTrial(store, context.channel);
  if (running && context.now < trialEnd(running.plan)) {
    return respondNotes(
      `A format trial runs until ${isoDay(new Date(trialEnd(running.plan)).toISOString())} and switches formats itself, so formats cannot be changed by hand until it ends.`,
    );
  }
  const name = word === "end" ? null : checkName(args[0]);
  if (name === null && current === null)
    return respondNotes("No format is running, so there is nothing to end.");
  if (name !== null && name === current) return respondNotes(`The format is already ${name}.`);
  await ingest(
    store,
    { type: "format", at: context.now, channel: context.channel, format: name },
    `cmd:format:${context.channel}:${commandOccurrence(context)}:${name ?? ""}`,
    { receivedAt: context.now },
  );
  return respondNotes(
    name === null
      ? `The format ${current} has ended. /influence compare formats compares the formats so far.`
      : `The format is now ${name}${current ? ` (was ${current})` : ""}. Replies and mentions from now on count for it; /influence compare formats compares formats once each has a few days of data.`,
  );
}

async function trial(
  context: CommandContext,
  deps: CommandDeps,
  args: readonly string[],
): Promise<CommandResponse> {
  const usage =
    "write /influence format trial written-first rotating-hosts weeks 4 (add random, or random seed 7, for a random order in each pair of weeks)";
  const weeksAt = args.findIndex((w) => w.toLowerCase() === "weeks");
  if (args.length < 4 || weeksAt !== 2) {
    throw new PlumblineError("ARG_BAD_VALUE", "a trial needs two formats and a number of weeks", {
      hint: usage,
    });
  }
  const a = checkName(args[0]);
  const b = checkName(args[1]);
  const weeks = Number(args[3]);
  const rest = args.slice(4).map((w) => w.toLowerCase());
  let design: "alternating" | "random" = "alternating";
  let seed: number | undefined;
  if (rest.length > 0) {
    if (
      rest[0] !== "random" ||
      (rest.length !== 1 && !(rest.length === 3 && rest[1] === "seed" && /^\d{1,9}$/.test(rest[2])))
    ) {
      throw new PlumblineError(
        "ARG_BAD_VALUE",
        `"${args.slice(4).join(" ")}" is not part of a trial`,
        { hint: usage },
      );
    }
    design = "random";
    if (rest.length === 3) seed = Number(rest[2]);
  }
  const existing = await readTrial(deps.store, context.channel);
  if (existing && context.now < trialEnd(existing.plan)) {
    return respondNotes(
      `A trial of ${existing.plan.a} and ${existing.plan.b} already runs until ${isoDay(new Date(trialEnd(existing.plan)).toISOString())}. Nothing was changed.`,
    );
  }
  const plan = planTrial({
    a,
    b,
    weeks,
    start: context.now,
    design,
    ...(seed !== undefined ? { seed } : {}),
  });
  await deps.store.writeChannelState(context.channel, "format-trial", {
    plan,
    applied: 0,
    verdictPosted: false,
  });
  await applyTrialSwitches(deps.store, context.channel, context.now);
  const weeksText = plan.schedule
    .map(
      (f, i) =>
        `week ${i + 1} (from ${isoDay(new Date(plan.start + i * WEEK_MS).toISOString())}): ${f}`,
    )
    .join("; ");
  return respond(
    [
      { kind: "heading", text: `Format trial · ${a} and ${b}, ${weeks} weeks` },
      {
        kind: "note",
        text: `The two formats take turns week by week, so a drift over the weeks or one busy week falls on both: ${weeksText}.`,
      },
      {
        kind: "note",
        text: `The bot switches the format at each week's start and posts the result when the trial ends on ${isoDay(new Date(trialEnd(plan)).toISOString())}.`,
      },
    ],
    "channel",
  );
}

async function listFormats(context: CommandContext, deps: CommandDeps): Promise<CommandResponse> {
  const snapshot = await deps.store.loadSnapshot(context.channel);
  const periods = formatPeriods(snapshot.formats ?? [], context.now);
  const blocks: Block[] = [{ kind: "heading", text: `Formats · ${context.channel}` }];
  if (periods.length === 0) {
    blocks.push({
      kind: "note",
      text: "No format periods yet. A facilitator starts one with /influence format <name>, e.g. /influence format written-first.",
    });
  } else {
    blocks.push({
      kind: "figures",
      rows: periods.map((p) => ({
        label: p.format,
        value: `${isoDay(new Date(p.start).toISOString())}..${p.open ? "now" : isoDay(new Date(p.end).toISOString())}`,
      })),
    });
  }
  const running = await readTrial(deps.store, context.channel);
  if (running && context.now < trialEnd(running.plan)) {
    blocks.push({
      kind: "note",
      text: `A trial runs: this week ${trialFormatAt(running.plan, context.now)}; it ends on ${isoDay(new Date(trialEnd(running.plan)).toISOString())}.`,
    });
  }
  return respond(blocks);
}

/** `compare formats [A B]`. */
export async function compareFormatsCommand(
  context: CommandContext,
  deps: CommandDeps,
  args: readonly string[],
): Promise<CommandResponse> {
  if (args.length !== 0 && args.length !== 2) {
    throw new PlumblineError("ARG_BAD_VALUE", "compare formats takes two format names, or none", {
      hint: "write /influence compare formats, or /influence compare formats written-first rotating-hosts",
    });
  }
  await applyTrialSwitches(deps.store, context.channel, context.now);
  const settings = await readChannelSettings(deps.store, context.channel);
  const snapshot = await deps.store.loadSnapshot(context.channel);
  const report = compareFormats(snapshot, analysisSettingsFor(settings), {
    until: context.now,
    ...(args.length === 2 ? { pair: [args[0], args[1]] as const } : {}),
  });
  if (args.length === 2) {
    const known = report.formats.map((f) => f.format);
    const missing = args.filter((a) => !known.includes(a));
    if (missing.length > 0) {
      throw new PlumblineError(
        "ARG_BAD_VALUE",
        `there is no format "${missing[0]}" in this channel`,
        {
          hint: `the formats are ${known.length > 0 ? known.join(", ") : "none yet"}; /influence format list shows them`,
        },
      );
    }
  }
  return respond([...formatsBlocks(report), { kind: "footer", text: EXPLAIN_POINTER }]);
}
