/**
 * @module demo-scenario
 * The invented scenario the demo runs on: the volunteers' channel of a neighbourhood tool library,
 * 14 members over 8 weeks. In weeks 1–4 the coordinator runs every thread and most replies go to
 * her; from week 5 the channel switches to rotating hosts, where each week's host opens the threads
 * and members answer one another. Seeded, so every run produces the same log. All names and
 * events are made up for the demo.
 */

import { parseDateRange } from "../../src/domain/date-range.js";
import type { ChatEvent, ConsentLevel } from "../../src/domain/events.js";
import { DAY_MS } from "../../src/domain/settings.js";
import { createSeededRng, type Rng } from "../../src/ports/rng.js";

export const DEMO_CHANNEL = "tool-library-volunteers";
export const DEMO_START = Date.UTC(2026, 9, 5, 8, 0, 0); // Monday 2026-10-05
export const DEMO_WEEKS = 8;
export const DEMO_SWITCH_WEEK = 4; // weeks 0–3 coordinator-led, 4–7 rotating hosts

const COORDINATOR = "rosa";
const MEMBERS: readonly { id: string; consent: ConsentLevel; group: string }[] = [
  { id: "rosa", consent: "named", group: "front-desk" },
  { id: "dev", consent: "named", group: "repair-crew" },
  { id: "ines", consent: "named", group: "front-desk" },
  { id: "kofi", consent: "named", group: "repair-crew" },
  { id: "lena", consent: "counted", group: "front-desk" },
  { id: "mato", consent: "counted", group: "repair-crew" },
  { id: "nadia", consent: "named", group: "outreach" },
  { id: "oren", consent: "counted", group: "repair-crew" },
  { id: "pia", consent: "counted", group: "outreach" },
  { id: "quinn", consent: "counted", group: "front-desk" },
  { id: "ravi", consent: "counted", group: "outreach" },
  { id: "sol", consent: "named", group: "repair-crew" },
  { id: "tomas", consent: "counted", group: "outreach" },
  { id: "uma", consent: "off", group: "front-desk" },
];

function pick<T>(rng: Rng, items: readonly T[]): T {
  return items[Math.floor(rng.next() * items.length)];
}

function iso(ms: number): number {
  return Math.round(ms / 1000) * 1000;
}

/** The scenario's events in time order. */
export function demoEvents(seed = 2026): ChatEvent[] {
  const rng = createSeededRng(seed);
  const events: ChatEvent[] = [];
  const channel = DEMO_CHANNEL;
  let clock = DEMO_START - DAY_MS;
  for (const m of MEMBERS) {
    clock += 60_000;
    if (m.consent !== "off")
      events.push({
        type: "consent",
        at: clock,
        channel,
        member: m.id,
        level: m.consent,
        notice: "v1",
      });
  }
  for (const m of MEMBERS) {
    clock += 60_000;
    events.push({ type: "group", at: clock, channel, member: m.id, group: m.group });
  }
  // The two formats as tagged periods (DESIGN.md §3 `format` events).
  events.push({ type: "format", at: DEMO_START, channel, format: "coordinator-led" });
  events.push({
    type: "format",
    at: DEMO_START + DEMO_SWITCH_WEEK * 7 * DAY_MS,
    channel,
    format: "rotating-hosts",
  });
  const ids = MEMBERS.map((m) => m.id);
  const others = (who: string) => ids.filter((x) => x !== who);
  let counter = 0;
  for (let week = 0; week < DEMO_WEEKS; week++) {
    const rotating = week >= DEMO_SWITCH_WEEK;
    const host = rotating ? ids[(week * 3 + 1) % ids.length] : COORDINATOR;
    for (let day = 0; day < 5; day++) {
      const threads = 2 + Math.floor(rng.next() * 2);
      for (let t = 0; t < threads; t++) {
        let at =
          DEMO_START +
          (week * 7 + day) * DAY_MS +
          (1 + t * 3) * 3_600_000 +
          Math.floor(rng.next() * 3_600_000);
        const opener = rotating
          ? rng.next() < 0.5
            ? host
            : pick(rng, ids)
          : rng.next() < 0.8
            ? COORDINATOR
            : pick(rng, ids);
        const rootId = `m${++counter}`;
        const rootMentions = rotating
          ? [pick(rng, others(opener)), pick(rng, others(opener))]
          : opener === COORDINATOR
            ? [pick(rng, others(opener))]
            : [COORDINATOR];
        events.push({
          type: "message",
          at: iso(at),
          channel,
          id: rootId,
          author: opener,
          mentions: [...new Set(rootMentions)],
        });
        const replies = 3 + Math.floor(rng.next() * 4);
        let last = { id: rootId, author: opener };
        for (let r = 0; r < replies; r++) {
          at += 300_000 + Math.floor(rng.next() * 1_800_000);
          const author = rotating
            ? pick(rng, others(last.author))
            : rng.next() < 0.35
              ? COORDINATOR
              : pick(rng, others(COORDINATOR));
          if (author === last.author) continue;
          const id = `m${++counter}`;
          // Coordinator-led: replies answer the thread root (her); rotating: members answer each other.
          const answers = rotating && rng.next() < 0.7 ? last : { id: rootId, author: opener };
          const mentions = rotating
            ? rng.next() < 0.3
              ? [pick(rng, others(author))]
              : []
            : rng.next() < 0.4 && author !== COORDINATOR
              ? [COORDINATOR]
              : [];
          events.push({
            type: "message",
            at: iso(at),
            channel,
            id,
            author,
            parent: answers.id,
            mentions,
          });
          last = { id, author };
        }
      }
    }
    // A few edits and a deletion, as real channels have.
    if (week === 2) {
      const target = events.find((e) => e.type === "message" && e.id === `m${counter - 3}`);
      if (target && target.type === "message") {
        events.push({
          type: "edit",
          at: target.at + 120_000,
          channel,
          id: target.id,
          mentions: ["kofi"],
        });
      }
      events.push({
        type: "delete",
        at: DEMO_START + (week * 7 + 5) * DAY_MS,
        channel,
        id: `m${counter - 1}`,
      });
    }
  }
  return events.sort((a, b) => a.at - b.at);
}

/** The scenario as a neutral JSON Lines log (DESIGN.md §3). */
export function demoLog(seed = 2026): string {
  return demoEvents(seed)
    .map((e) => JSON.stringify({ ...e, at: new Date(e.at).toISOString() }))
    .join("\n")
    .concat("\n");
}

function levelCount(level: ConsentLevel): number {
  return MEMBERS.filter((m) => m.consent === level).length;
}

export function demoDescription(): string {
  return [
    "Scenario (invented): the volunteers' channel of a neighbourhood tool library, 14 members, 8 weeks",
    "from 2026-10-05. Weeks 1–4: the coordinator opens nearly every thread and most replies go to her.",
    "Weeks 5–8: rotating hosts open the threads and members answer one another.",
    `Consent: ${levelCount("named")} members named, ${levelCount("counted")} counted but never named, ${levelCount("off")} has not opted in (never counted).`,
  ].join("\n");
}

function day(ms: number): string {
  return new Date(ms).toISOString().slice(0, 10);
}

/** The two formats as ranges: coordinator-led weeks (A) and rotating hosts (B). */
export function demoRanges() {
  const split = DEMO_START + DEMO_SWITCH_WEEK * 7 * DAY_MS;
  return {
    a: parseDateRange(`${day(DEMO_START)}..${day(split - DAY_MS)}`),
    b: parseDateRange(`${day(split)}..${day(DEMO_START + DEMO_WEEKS * 7 * DAY_MS - DAY_MS)}`),
  };
}
