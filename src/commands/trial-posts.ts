/**
 * @module trial-posts
 * What a running format trial has to post, for the scheduler (DESIGN.md §1 format trial): at the
 * start of each week after the first, which format runs now (the first week is announced by the
 * command that planned the trial); when the trial ends, its result. Each post is claimed by the
 * scheduler under (channel, "trial", period), so one replica posts it once, restarts included.
 * Asking also records the switches that are due in the ledger (`applyTrialSwitches`).
 */
import { type TrialPlan, trialEnd, trialVerdict, WEEK_MS } from "../analysis/format-trial.js";
import type { Block } from "../domain/blocks.js";
import { analysisSettingsFor } from "../domain/channel-settings.js";
import { DAY_MS } from "../domain/settings.js";
import type { OutgoingMessage } from "../ports/chat-platform.js";
import type { Store } from "../ports/store.js";
import { EXPLAIN_POINTER } from "../report/digest-blocks.js";
import { formatsBlocks, trialWeekBlocks } from "../report/format-blocks.js";
import { renderText } from "../report/render-text.js";
import { readChannelSettings } from "./channel-settings-store.js";
import { applyTrialSwitches, readTrial } from "./format-commands.js";

/** A week's switch post is stale this long after the week started (the week is under way). */
export const SWITCH_STALE_MS = DAY_MS;

/** One post a trial has due (the scheduler's `DuePost`). */
export interface TrialPost {
  readonly period: string;
  readonly dueAt: number;
  readonly staleAt: number | null;
  readonly compose: () => Promise<OutgoingMessage | null>;
  readonly onPosted?: () => Promise<void>;
}

/** The claim period prefix of a trial: its start as a UTC minute. */
export function trialLabel(plan: TrialPlan): string {
  return `trial ${new Date(plan.start).toISOString().slice(0, 16)}Z`;
}

function message(blocks: readonly Block[]): OutgoingMessage {
  return { blocks, text: renderText(blocks) };
}

/** The trial result as a message: the formats compared on the trial's weeks only. */
export async function trialResultMessage(
  store: Store,
  channel: string,
  plan: TrialPlan,
): Promise<OutgoingMessage> {
  const settings = await readChannelSettings(store, channel);
  const snapshot = await store.loadSnapshot(channel);
  const report = trialVerdict(snapshot, analysisSettingsFor(settings), plan);
  return message([
    ...formatsBlocks(report, `Format trial result: ${plan.a} against ${plan.b}`),
    { kind: "footer", text: EXPLAIN_POINTER },
  ]);
}

/**
 * The posts due at `now`: the current week's switch (from its second week on), or, once the
 * trial has ended and until its result is marked posted, the result (never stale: a late result
 * is still the answer the channel waited for).
 */
export async function dueTrialPosts(
  store: Store,
  channel: string,
  now: number,
): Promise<TrialPost[]> {
  const trial = await applyTrialSwitches(store, channel, now);
  if (trial === null || now < trial.plan.start) return [];
  const { plan } = trial;
  const end = trialEnd(plan);
  if (now < end) {
    const week = Math.floor((now - plan.start) / WEEK_MS);
    if (week < 1) return [];
    const dueAt = plan.start + week * WEEK_MS;
    return [
      {
        period: `${trialLabel(plan)} week ${week + 1}`,
        dueAt,
        staleAt: dueAt + SWITCH_STALE_MS,
        compose: async () => message(trialWeekBlocks(plan, week)),
      },
    ];
  }
  if (trial.verdictPosted) return [];
  return [
    {
      period: `${trialLabel(plan)} result`,
      dueAt: end,
      staleAt: null,
      compose: () => trialResultMessage(store, channel, plan),
      onPosted: async () => {
        // Only a hint that saves the claim look-up from now on; the claim is what posts it once.
        const current = await readTrial(store, channel);
        if (current !== null && current.plan.start === plan.start) {
          await store.writeChannelState(channel, "format-trial", {
            ...current,
            verdictPosted: true,
          });
        }
      },
    },
  ];
}
