/**
 * @module random-events
 * A seeded stream of invented `ChatEvent`s with delivery keys, covering every event type, replies
 * by id and by named author, repeated mentions, consent changes that arrive late (earlier `at`
 * than events already applied), edits, deletes and undeletes. Same seed, same stream.
 */
import type { ChatEvent, ConsentLevel } from "../../src/domain/events.js";
import type { Delivery } from "../../src/ingest/ingest.js";
import { createSeededRng } from "../../src/ports/rng.js";

export const STREAM_T0 = Date.UTC(2026, 10, 2, 9, 0, 0);

export interface StreamOptions {
  readonly seed: number;
  readonly count: number;
  readonly members?: number;
  readonly channels?: readonly string[];
  /** Levels of later consent changes; default counted, named (twice as often) and off. */
  readonly levels?: readonly ConsentLevel[];
  /** Level of each member's first consent change; default counted. */
  readonly initialLevel?: ConsentLevel;
}

export function randomDeliveries(options: StreamOptions): Delivery[] {
  const rng = createSeededRng(options.seed);
  const pick = <T>(items: readonly T[]): T => items[Math.floor(rng.next() * items.length)];
  const members = Array.from({ length: options.members ?? 8 }, (_, i) => `U${i + 1}`);
  const channels = options.channels ?? ["c1"];
  const ids: Map<string, string[]> = new Map(channels.map((c) => [c, []]));
  const levels = options.levels ?? ["counted", "named", "named", "off"];
  const initial = options.initialLevel ?? "counted";
  const out: Delivery[] = [];
  let at = STREAM_T0;
  for (let i = 0; i < options.count; i++) {
    at += Math.floor(rng.next() * 600_000);
    const channel = pick(channels);
    const known = ids.get(channel) ?? [];
    const r = rng.next();
    let event: ChatEvent;
    if (i < members.length * channels.length || r < 0.1) {
      const member =
        i < members.length * channels.length ? members[i % members.length] : pick(members);
      // Some consent changes arrive late: their time lies before events already applied.
      const when = rng.next() < 0.2 ? at - Math.floor(rng.next() * 7_200_000) : at;
      event = {
        type: "consent",
        at: when,
        channel,
        member,
        level: i < members.length ? initial : pick(levels),
        notice: "v1",
      };
    } else if (r < 0.7 || known.length === 0) {
      const id = `${channel}-m${i}`;
      const mentions = Array.from({ length: Math.floor(rng.next() * 4) }, () => pick(members));
      const reply = known.length > 0 && rng.next() < 0.5;
      event = {
        type: "message",
        at,
        channel,
        id,
        author: pick(members),
        ...(reply ? { parent: pick(known) } : {}),
        ...(reply && rng.next() < 0.3 ? { parentAuthor: pick(members) } : {}),
        ...(mentions.length > 0 ? { mentions } : {}),
      };
      known.push(id);
    } else if (r < 0.8) {
      const mentions = Array.from({ length: Math.floor(rng.next() * 3) }, () => pick(members));
      event = { type: "edit", at, channel, id: pick(known), mentions };
    } else if (r < 0.87) {
      event = { type: "delete", at, channel, id: pick(known) };
    } else if (r < 0.9) {
      event = { type: "undelete", at, channel, id: pick(known) };
    } else {
      event = {
        type: "group",
        at,
        channel,
        member: pick(members),
        group: rng.next() < 0.2 ? null : pick(["north", "south"]),
      };
    }
    out.push({ event, deliveryKey: `d${i}` });
  }
  return out;
}
