/**
 * Digests whose local time falls into a daylight-saving gap or the repeated hour. Dates: in the
 * EU summer time starts on the last Sunday of March and ends on the last Sunday of October at
 * 01:00 UTC (Directive 2000/84/EC, Art. 2–3); in the US it starts on the second Sunday of March
 * and ends on the first Sunday of November at 02:00 local (15 U.S.C. §260a, as amended by the
 * Energy Policy Act of 2005, §110). What we expect where the wall clock skips or repeats a time
 * (our choice, recorded in DEVELOPERS.md): a skipped 02:30 is posted once, at the first minute
 * that exists after the gap (03:00 local); a repeated 02:30 (or 01:30) is posted once, at its first
 * occurrence. Never twice, never lost.
 */
import { afterEach, describe, expect, it, vi } from "vitest";
import { ManualClock } from "../../src/ports/clock.js";
import type { Store } from "../../src/ports/store.js";
import { createMemoryStore } from "../../src/store/memory-store.js";
import { MINUTE, makeScheduler, runUntil, settingsMap } from "./harness.js";

const KEY = "schedule-test-key-0123456789abcdef012345";
const iso = (ms: number) => new Date(ms).toISOString();
const open: Store[] = [];

afterEach(async () => {
  vi.useRealTimers();
  for (const store of open.splice(0)) await store.close();
});

async function postsBetween(
  timezone: string,
  time: string,
  from: number,
  to: number,
): Promise<string[]> {
  const store = createMemoryStore({ idKey: KEY });
  open.push(store);
  await store.registerChannel("c1", null);
  const clock = new ManualClock(from);
  const { scheduler, platform } = makeScheduler({
    store,
    clock,
    // weekday 7 = Sunday, the day every change named above happens on.
    readSettings: settingsMap({ c1: { timezone, digest: { weekday: 7, time } } }),
  });
  await runUntil(clock, to, 15 * MINUTE, () => scheduler.tick());
  return platform.posts.map((p) => iso(p.at));
}

describe("digest times that a daylight-saving change skips or repeats", () => {
  it("Berlin, 2027-03-28: 02:30 does not exist; posted once at 03:00 CEST (01:00Z)", async () => {
    const posts = await postsBetween(
      "Europe/Berlin",
      "02:30",
      Date.UTC(2027, 2, 20),
      Date.UTC(2027, 3, 6),
    );
    expect(posts).toEqual([
      "2027-03-21T01:30:00.000Z", // 02:30 CET
      "2027-03-28T01:00:00.000Z", // the gap 02:00–03:00 CET: first minute after it
      "2027-04-04T00:30:00.000Z", // 02:30 CEST
    ]);
  });

  it("Berlin, 2026-10-25: 02:30 happens twice; posted once, at the first (00:30Z)", async () => {
    const posts = await postsBetween(
      "Europe/Berlin",
      "02:30",
      Date.UTC(2026, 9, 17),
      Date.UTC(2026, 10, 3),
    );
    expect(posts).toEqual([
      "2026-10-18T00:30:00.000Z",
      "2026-10-25T00:30:00.000Z", // 02:30 CEST; 02:30 CET (01:30Z) is not posted again
      "2026-11-01T01:30:00.000Z",
    ]);
  });

  it("New York, 2027-03-14: 02:30 does not exist; posted once at 03:00 EDT (07:00Z)", async () => {
    const posts = await postsBetween(
      "America/New_York",
      "02:30",
      Date.UTC(2027, 2, 6),
      Date.UTC(2027, 2, 23),
    );
    expect(posts).toEqual([
      "2027-03-07T07:30:00.000Z",
      "2027-03-14T07:00:00.000Z",
      "2027-03-21T06:30:00.000Z",
    ]);
  });

  it("New York, 2026-11-01: 01:30 happens twice; posted once, at the first (05:30Z)", async () => {
    const posts = await postsBetween(
      "America/New_York",
      "01:30",
      Date.UTC(2026, 9, 24),
      Date.UTC(2026, 10, 10),
    );
    expect(posts).toEqual([
      "2026-10-25T05:30:00.000Z",
      "2026-11-01T05:30:00.000Z", // 01:30 EDT; 01:30 EST (06:30Z) is not posted again
      "2026-11-08T06:30:00.000Z",
    ]);
  });
});
