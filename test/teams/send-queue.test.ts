import { describe, expect, it } from "vitest";
import { isRetryable, retryAfterMs, SendQueue } from "../../adapters/teams/send-queue.js";
import { ManualClock } from "../../src/ports/clock.js";

function queue(clock: ManualClock, sleeps: number[] = [], perSecond = 6) {
  return new SendQueue({
    perSecond,
    now: () => clock.now(),
    sleep: async (ms) => {
      sleeps.push(ms);
      clock.advance(ms);
    },
    random: () => 0.5,
  });
}

const refused = (statusCode: number, retryAfter?: string) =>
  Object.assign(new Error(`status ${statusCode}`), {
    statusCode,
    response: {
      status: statusCode,
      headers: { get: (n: string) => (n === "retry-after" ? retryAfter : undefined) },
    },
  });

describe("SendQueue", () => {
  // Teams allows 7 sends per second per bot per conversation (learn.microsoft.com, bots rate-limit page).
  it("keeps any rolling second of one conversation under 7 sends", async () => {
    const clock = new ManualClock(0);
    const q = queue(clock);
    const times: number[] = [];
    await Promise.all(
      Array.from({ length: 40 }, () => q.send("c1", async () => times.push(clock.now()))),
    );
    expect(times).toHaveLength(40);
    for (let i = 0; i < times.length; i++) {
      const inWindow = times.filter((t) => t > times[i] - 1000 && t <= times[i]).length;
      expect(inWindow).toBeLessThanOrEqual(6);
    }
    for (let i = 1; i < times.length; i++) expect(times[i]).toBeGreaterThanOrEqual(times[i - 1]);
  });

  // Microsoft's per-bot, per-conversation limits for sending (MicrosoftDocs/msteams-docs,
  // msteams-platform/bots/how-to/rate-limit.md, "Per bot per thread limit"): 7 per 1 s, 8 per 2 s,
  // 60 per 30 s, 1,800 per 3,600 s. Checked over every window ending at each send.
  it("keeps a burst to one conversation within every published window (1 s, 2 s, 30 s, 1 h)", async () => {
    const clock = new ManualClock(0);
    const q = queue(clock);
    const times: number[] = [];
    await Promise.all(
      Array.from({ length: 1900 }, () => q.send("c1", async () => times.push(clock.now()))),
    );
    expect(times).toHaveLength(1900);
    const published: [number, number][] = [
      [1000, 7],
      [2000, 8],
      [30_000, 60],
      [3_600_000, 1800],
    ];
    let lo = 0;
    for (const [ms, n] of published) {
      lo = 0;
      for (let i = 0; i < times.length; i++) {
        while (times[lo] <= times[i] - ms) lo++;
        expect(i - lo + 1).toBeLessThanOrEqual(n);
      }
    }
    // 8 per 2 s binds first, then 60 per 30 s: the 61st send waits for the first to be 30 s old,
    // and the 1,801st for the first to be an hour old.
    expect(times[60]).toBe(times[0] + 30_000);
    expect(times[1800]).toBeGreaterThanOrEqual(times[0] + 3_600_000);
    // Not slower than the limits need: 60 sends per 30 s on average over the first hour.
    expect(times[1799]).toBeLessThan(3_600_000);
  });

  it("conversations are paced separately", async () => {
    const clock = new ManualClock(0);
    const sleeps: number[] = [];
    const q = queue(clock, sleeps);
    await Promise.all(
      ["a", "b", "c"].flatMap((k) => Array.from({ length: 6 }, () => q.send(k, async () => 1))),
    );
    expect(sleeps).toEqual([]);
  });

  it("retries 429 and 412 with growing jittered delays, honouring Retry-After", async () => {
    for (const status of [429, 412]) {
      const clock = new ManualClock(0);
      const sleeps: number[] = [];
      let calls = 0;
      const result = await queue(clock, sleeps).send("c", async () => {
        calls += 1;
        if (calls < 3) throw refused(status);
        return "ok";
      });
      expect(result).toBe("ok");
      expect(calls).toBe(3);
      // random 0.5: half fixed plus a quarter of the ceiling (1 s, then 2 s).
      expect(sleeps).toEqual([750, 1500]);
    }
    const clock = new ManualClock(0);
    const sleeps: number[] = [];
    let calls = 0;
    await queue(clock, sleeps).send("c", async () => {
      calls += 1;
      if (calls === 1) throw refused(429, "7");
      return "ok";
    });
    expect(sleeps).toEqual([7000]);
  });

  // A 502/504 may have been delivered: resending could post a digest twice (the Slack queue's rule).
  it("never resends after a 502 or 504, and makes the conversation's next send wait", async () => {
    for (const status of [502, 504]) {
      const clock = new ManualClock(0);
      const sleeps: number[] = [];
      const q = queue(clock, sleeps);
      let calls = 0;
      const error = refused(status);
      await expect(
        q.send("c", async () => {
          calls += 1;
          throw error;
        }),
      ).rejects.toBe(error);
      expect(calls).toBe(1);
      expect(sleeps).toEqual([]);
      await q.send("c", async () => "next");
      // random 0.5: half of the 1 s ceiling fixed plus a quarter.
      expect(sleeps).toEqual([750]);
      await q.send("other", async () => "elsewhere");
      expect(sleeps).toEqual([750]);
    }
  });

  it("never retries an unknown outcome or a client error, and gives up after 5 attempts", async () => {
    for (const error of [
      refused(500),
      refused(502),
      refused(504),
      refused(400),
      Object.assign(new Error("reset"), { code: "ECONNRESET" }),
    ]) {
      let calls = 0;
      await expect(
        queue(new ManualClock(0)).send("c", async () => {
          calls += 1;
          throw error;
        }),
      ).rejects.toBe(error);
      expect(calls).toBe(1);
    }
    let calls = 0;
    await expect(
      queue(new ManualClock(0)).send("c", async () => {
        calls += 1;
        throw refused(429);
      }),
    ).rejects.toThrow();
    expect(calls).toBe(5);
  });

  it("reads Retry-After as seconds or an HTTP date", () => {
    expect(retryAfterMs(refused(429, "2"), 0)).toBe(2000);
    expect(retryAfterMs(refused(429, new Date(5000).toUTCString()), 0)).toBe(5000);
    expect(retryAfterMs(refused(429), 0)).toBeNull();
    expect(isRetryable(Object.assign(new Error("refused"), { code: "ECONNREFUSED" }))).toBe(true);
  });
});
