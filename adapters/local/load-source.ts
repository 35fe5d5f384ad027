/**
 * @module load-source
 * Where an analysing command gets its channel: a neutral event log (JSON Lines), read streaming
 * and replayed into an in-memory ledger. Picks the channel (the only one, or `--channel`).
 */
import { buildLedgers } from "../../src/attention/channel-ledger.js";
import { readEventLogFile } from "../../src/attention/read-event-log.js";
import { PlumblineError } from "../../src/domain/errors.js";
import type { LedgerSnapshot } from "../../src/domain/ledger.js";

export interface LoadedSource {
  readonly snapshot: LedgerSnapshot;
  /** Bad lines skipped with --skip-bad. */
  readonly skipped: number;
}

export async function loadLogChannel(args: {
  path: string;
  channel?: string;
  until?: number;
  skipBad: boolean;
}): Promise<LoadedSource> {
  const { events, skipped } = await readEventLogFile(args.path, { skipBad: args.skipBad });
  const ledgers = buildLedgers(events, args.until === undefined ? {} : { until: args.until });
  if (ledgers.size === 0) {
    throw new PlumblineError("ARG_BAD_VALUE", `the log ${args.path} holds no events`, {
      hint: "check the file: one JSON event per line, see the README's log format",
    });
  }
  const channels = [...ledgers.keys()];
  const channel = args.channel ?? (channels.length === 1 ? channels[0] : undefined);
  if (channel === undefined) {
    throw new PlumblineError(
      "ARG_MISSING",
      `the log holds ${channels.length} channels (${channels.slice(0, 5).join(", ")}${channels.length > 5 ? ", …" : ""})`,
      {
        hint: "pick one with --channel",
      },
    );
  }
  const snapshot = ledgers.get(channel);
  if (snapshot === undefined) {
    throw new PlumblineError("ARG_BAD_VALUE", `channel "${channel}" is not in the log`, {
      hint: `use one of: ${channels.slice(0, 10).join(", ")}`,
    });
  }
  return { snapshot, skipped: skipped.length };
}
