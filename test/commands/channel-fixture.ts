/**
 * Test helpers for the command tests: an in-memory store, a command runner and an invented
 * channel where members join through `/influence join` and then reply to and mention each other.
 */
import type {
  CommandContext,
  CommandDeps,
  CommandResponse,
} from "../../src/commands/handle-command.js";
import { handleCommand } from "../../src/commands/handle-command.js";
import { ingest } from "../../src/ingest/ingest.js";
import type { Store } from "../../src/ports/store.js";
import { openStore } from "../../src/store/open-store.js";
import { TEST_KEY } from "../store/test-key.js";

export const CHANNEL = "C-TEAM";
/** 2026-11-02 09:00 UTC, a Monday. */
export const T0 = Date.UTC(2026, 10, 2, 9, 0, 0);
export const HOUR = 3_600_000;
export const DAY = 24 * HOUR;

export async function memoryStore(): Promise<Store> {
  return openStore("sqlite::memory:", { idKey: TEST_KEY });
}

export interface Runner {
  readonly store: Store;
  readonly deps: CommandDeps;
  run(member: string, text: string, extra?: Partial<CommandContext>): Promise<CommandResponse>;
}

/** Distinctive display names, so a test can tell whether a name leaked into a message. */
export const NAMES: Record<string, string> = {
  UANA: "Ana Arbor",
  UBO: "Bo Birch",
  UCY: "Cy Cedar",
  UDEE: "Dee Dogwood",
  UELI: "Eli Elm",
  UFAY: "Fay Fir",
  UGUS: "Gus Gum",
  UBOSS: "Morgan Maple",
};

/** Default `now` of the runner: T0 + 20 days (a Sunday). */
export const NOW = T0 + 20 * DAY;

export async function runner(
  options: { facilitators?: string[]; now?: number; store?: Store } = {},
): Promise<Runner> {
  const store = options.store ?? (await memoryStore());
  const deps: CommandDeps = {
    store,
    facilitators: options.facilitators ?? ["UBOSS"],
    displayName: async (id) => NAMES[id] ?? null,
  };
  return {
    store,
    deps,
    run: (member, text, extra = {}) =>
      handleCommand(
        {
          channel: CHANNEL,
          member,
          text,
          now: options.now ?? NOW,
          isPlatformAdmin: false,
          ...extra,
        },
        deps,
      ),
  };
}

let messageId = 0;

/** `from` mentions `to`, `times` times, starting at `at` one minute apart. */
export async function mentions(
  store: Store,
  args: { from: string; to: string; times: number; at: number },
): Promise<void> {
  for (let k = 0; k < args.times; k++) {
    messageId++;
    const id = `m${messageId}`;
    await ingest(
      store,
      {
        type: "message",
        at: args.at + k * 60_000,
        channel: CHANNEL,
        id,
        author: args.from,
        mentions: [args.to],
      },
      `test:${id}`,
      { receivedAt: args.at },
    );
  }
}

/**
 * Six invented members: UANA joins named, the others counted, at T0 through `join`; then over the
 * next days most attention goes to UANA. Returns the runner at T0 + 20 days.
 */
export async function busyChannel(options: { facilitators?: string[] } = {}): Promise<Runner> {
  const r = await runner(options);
  await r.run("UANA", "join named", { now: T0 });
  for (const m of ["UBO", "UCY", "UDEE", "UELI", "UFAY"]) await r.run(m, "join", { now: T0 });
  const at = T0 + DAY;
  const plan: [string, string, number][] = [
    ["UBO", "UANA", 8],
    ["UCY", "UANA", 7],
    ["UDEE", "UANA", 6],
    ["UELI", "UANA", 5],
    ["UFAY", "UANA", 4],
    ["UANA", "UBO", 3],
    ["UANA", "UCY", 2],
    ["UBO", "UCY", 2],
    ["UCY", "UDEE", 2],
    ["UDEE", "UELI", 1],
    ["UELI", "UFAY", 1],
    ["UFAY", "UBO", 1],
  ];
  let k = 0;
  for (const [from, to, times] of plan) {
    await mentions(r.store, { from, to, times, at: at + k * HOUR });
    k++;
  }
  return r;
}
