/**
 * @module create-bot
 * The platform-neutral bot, assembled from the core's parts: ingestion (each event once, before
 * the platform is acknowledged), the `/influence` router, and the scheduler with its digest and
 * note composers. Every adapter (console, Slack, Teams) builds one with its own `ChatPlatform`;
 * nothing here knows a platform.
 */

import { inThreadRunner } from "../src/analysis/analysis-job.js";
import { readChannelSettings } from "../src/commands/channel-settings-store.js";
import type {
  CommandContext,
  CommandDeps,
  CommandResponse,
} from "../src/commands/command-types.js";
import { digestFormatLine } from "../src/commands/format-commands.js";
import { handleCommand } from "../src/commands/handle-command.js";
import { namingPolicy } from "../src/commands/member-view.js";
import { dueTrialPosts } from "../src/commands/trial-posts.js";
import { analysisSettingsFor } from "../src/domain/channel-settings.js";
import type { ChatEvent } from "../src/domain/events.js";
import { DAY_MS } from "../src/domain/settings.js";
import { ingest } from "../src/ingest/ingest.js";
import { noteDecision } from "../src/policy/note-decision.js";
import type { AnalysisRunner } from "../src/ports/analysis-runner.js";
import type { ChatPlatform, OutgoingMessage } from "../src/ports/chat-platform.js";
import type { Clock } from "../src/ports/clock.js";
import type { Logger } from "../src/ports/logger.js";
import { PSEUDONYM_PREFIX, type Store } from "../src/ports/store.js";
import { digestMessage } from "../src/report/digest-blocks.js";
import { noteMessage } from "../src/report/note-blocks.js";
import { Scheduler } from "../src/schedule/scheduler.js";
import type { NoteComposition, SchedulerDeps } from "../src/schedule/scheduler-deps.js";

export interface BotOptions {
  readonly store: Store;
  readonly platform: ChatPlatform;
  readonly clock: Clock;
  readonly logger: Logger;
  /** Platform ids that are facilitators everywhere (PLUMBLINE_FACILITATORS). */
  readonly facilitators: readonly string[];
  readonly replicaId: string;
  /** Signed report-page links (the served page); absent in the console. */
  readonly reportLink?: (channel: string, reader: string) => string;
  /** Claim lease and look-back for the scheduler. */
  readonly scheduling?: Pick<SchedulerDeps, "leaseMs" | "lookbackMs" | "jobs">;
  /** Where analyses run (serve: the queue over the worker pool); default the calling thread. */
  readonly analysis?: AnalysisRunner;
}

export interface Bot {
  /** Applies one platform event once; resolve before acknowledging the platform. */
  onEvent(event: ChatEvent, deliveryKey: string): Promise<{ applied: boolean }>;
  /** Answers one `/influence …` command. */
  onCommand(context: Omit<CommandContext, "now"> & { now?: number }): Promise<CommandResponse>;
  readonly scheduler: Scheduler;
  readonly commandDeps: CommandDeps;
  /** The store, for adapters' erasure on leave/uninstall and conversation references. */
  readonly store: Store;
}

export function createBot(options: BotOptions): Bot {
  const { store, platform, clock, logger } = options;
  const analysis: AnalysisRunner = options.analysis ?? inThreadRunner;
  const commandDeps: CommandDeps = {
    store,
    analysis,
    facilitators: options.facilitators,
    displayName: (id) => platform.displayName(id),
    ...(options.reportLink ? { reportLink: options.reportLink } : {}),
  };

  async function analyse(channel: string, until: number) {
    const settings = await readChannelSettings(store, channel);
    const snapshot = await store.loadSnapshot(channel);
    const report = await analysis.run(
      { kind: "analyze", snapshot, settings: analysisSettingsFor(settings), until },
      { exactUntil: true },
    );
    return { settings, snapshot, report };
  }

  async function composeDigest(channel: string, slotAt: number): Promise<OutgoingMessage | null> {
    const { settings, snapshot, report } = await analyse(channel, slotAt);
    // A window with no opted-in activity at all (e.g. before the bot arrived) gets no digest.
    if (report.members === 0 && report.signals === 0) return null;
    const previous = await analysis.run(
      {
        kind: "analyze",
        snapshot,
        settings: analysisSettingsFor(settings),
        until: slotAt - 7 * DAY_MS,
      },
      { exactUntil: true },
    );
    const policy = await namingPolicy({
      report,
      deps: commandDeps,
      namesOn: settings.names,
      disclosure: { snapshot, minMembers: settings.minMembers },
    });
    const formatLine = await digestFormatLine(store, channel, slotAt);
    const formatLines = formatLine === null ? [] : [formatLine];
    return digestMessage({
      report,
      previous: previous.sufficient ? previous : null,
      policy,
      formatLines,
    });
  }

  // A quiet channel is re-evaluated at most daily: with no new event the figures only drift with
  // decay, and a note is about a change in who the channel listens to.
  const lastNoteCheck = new Map<string, { at: number; lastEventAt: number | null }>();

  async function composeNote(channel: string, now: number): Promise<NoteComposition | null> {
    const info = (await store.listChannels()).find((c) => c.channel === channel);
    const lastEventAt = info?.lastEventAt ?? null;
    const previousCheck = lastNoteCheck.get(channel);
    if (
      previousCheck &&
      previousCheck.lastEventAt === lastEventAt &&
      now - previousCheck.at < DAY_MS
    ) {
      return null;
    }
    lastNoteCheck.set(channel, { at: now, lastEventAt });
    const { settings, snapshot, report } = await analyse(channel, now);
    if (settings.notes === "off" || !report.sufficient) return null;
    const decision = await noteDecision(store, channel, report, now, settings.notes);
    if (!decision.post || decision.audience === null) return null;
    const policy = await namingPolicy({
      report,
      deps: commandDeps,
      namesOn: settings.names,
      disclosure: { snapshot, minMembers: settings.minMembers },
    });
    const member =
      decision.member !== null && !decision.member.startsWith(PSEUDONYM_PREFIX)
        ? decision.member
        : null;
    return {
      message: noteMessage({ report, policy, audience: decision.audience }),
      audience: decision.audience,
      member,
      onPosted: () => decision.commit(),
    };
  }

  async function sendToFacilitators(channel: string, message: OutgoingMessage): Promise<void> {
    // The role keeps its platform id, so facilitators who joined `counted` are reached too.
    const stored = await store.facilitatorPlatformIds(channel);
    const targets = new Set([...options.facilitators, ...stored]);
    for (const id of targets) await platform.postPrivately(channel, id, message);
  }

  const scheduler = new Scheduler({
    store,
    platform,
    clock,
    logger,
    replicaId: options.replicaId,
    readSettings: (channel) => readChannelSettings(store, channel),
    composeDigest,
    composeNote,
    duePosts: (channel, now) => dueTrialPosts(store, channel, now),
    sendToFacilitators,
    ...options.scheduling,
  });

  return {
    scheduler,
    commandDeps,
    store,
    async onEvent(event, deliveryKey) {
      const result = await ingest(store, event, deliveryKey, { receivedAt: clock.now() });
      // Recorded as rejected (no content kept): acknowledged so the platform stops retrying.
      if (result.rejected !== undefined) {
        logger.warn(
          { channel: event.channel, code: result.rejected },
          "event rejected by the store",
        );
      }
      if (result.applied) analysis.invalidate?.(event.channel);
      return result;
    },
    onCommand(context) {
      return handleCommand({ ...context, now: context.now ?? clock.now() }, commandDeps);
    },
  };
}
