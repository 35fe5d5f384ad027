/**
 * @module format-trial
 * A format trial (DESIGN.md §1): two formats take turns week by week, so a drift over time or one
 * busy week falls on both. `alternating` is ABAB… (the alternating-treatments design: Barlow &
 * Hersen 1984, "Single Case Experimental Designs", 2nd ed., Pergamon; from memory); `random` puts A and
 * B in a seeded random order inside each block of two weeks (randomised blocks: Cochran & Cox
 * 1957, "Experimental Designs", 2nd ed., Wiley; from memory). The verdict is compare-formats' on the
 * trial's weeks only.
 */

import { PlumblineError } from "../domain/errors.js";
import type { FormatEvent } from "../domain/events.js";
import type { LedgerSnapshot } from "../domain/ledger.js";
import { type AnalysisSettings, DAY_MS } from "../domain/settings.js";
import { createSeededRng } from "../ports/rng.js";
import { compareFormats, type FormatsReport } from "./compare-formats.js";

export const WEEK_MS = 7 * DAY_MS;
/** Longest trial accepted, in weeks. */
export const MAX_TRIAL_WEEKS = 26;

export interface TrialPlan {
  readonly version: 1;
  readonly a: string;
  readonly b: string;
  /** Epoch ms of the first week's start. */
  readonly start: number;
  readonly weeks: number;
  readonly design: "alternating" | "random";
  readonly seed: number | null;
  /** The format of each week, in order. */
  readonly schedule: readonly string[];
}

export function planTrial(args: {
  readonly a: string;
  readonly b: string;
  readonly weeks: number;
  readonly start: number;
  readonly design?: "alternating" | "random";
  readonly seed?: number;
}): TrialPlan {
  const { a, b, weeks, start } = args;
  if (a === b) {
    throw new PlumblineError("ARG_BAD_VALUE", "a trial needs two different formats", {
      hint: "write /influence format trial written-first rotating-hosts weeks 4",
    });
  }
  if (!Number.isInteger(weeks) || weeks < 2 || weeks % 2 !== 0 || weeks > MAX_TRIAL_WEEKS) {
    throw new PlumblineError(
      "ARG_BAD_VALUE",
      `a trial runs an even number of weeks from 2 to ${MAX_TRIAL_WEEKS}, so each format gets as many weeks`,
      { hint: "write weeks 4, weeks 6 or weeks 8" },
    );
  }
  const design = args.design ?? "alternating";
  const schedule: string[] = [];
  const rng = design === "random" ? createSeededRng(args.seed ?? start) : null;
  for (let block = 0; block < weeks / 2; block++) {
    const flip = rng !== null && rng.next() < 0.5;
    schedule.push(flip ? b : a, flip ? a : b);
  }
  return {
    version: 1,
    a,
    b,
    start,
    weeks,
    design,
    seed: design === "random" ? (args.seed ?? start) : null,
    schedule,
  };
}

/** Epoch ms at which the trial ends. */
export function trialEnd(plan: TrialPlan): number {
  return plan.start + plan.weeks * WEEK_MS;
}

/** The format due at `at` under the plan; null outside the trial. */
export function trialFormatAt(plan: TrialPlan, at: number): string | null {
  if (at < plan.start || at >= trialEnd(plan)) return null;
  return plan.schedule[Math.floor((at - plan.start) / WEEK_MS)];
}

/** The format events the plan makes: one at each week's start, and an end at the trial's end. */
export function trialEvents(plan: TrialPlan, channel: string): FormatEvent[] {
  const events: FormatEvent[] = plan.schedule.map((format, i) => ({
    type: "format",
    at: plan.start + i * WEEK_MS,
    channel,
    format,
  }));
  events.push({ type: "format", at: trialEnd(plan), channel, format: null });
  return events;
}

/** compare-formats on the trial's weeks: A against B, until the trial's end. */
export function trialVerdict(
  snapshot: LedgerSnapshot,
  settings: AnalysisSettings,
  plan: TrialPlan,
): FormatsReport {
  const inTrial = (snapshot.formats ?? []).filter(
    (f) => f.at >= plan.start && f.at <= trialEnd(plan),
  );
  // Only the trial's own changes count; a format set before it does not run into its first week.
  const trialSnapshot: LedgerSnapshot = {
    ...snapshot,
    formats: [{ at: plan.start, format: null }, ...inTrial],
  };
  return compareFormats(trialSnapshot, settings, {
    until: trialEnd(plan),
    pair: [plan.a, plan.b],
  });
}
