import { describe, expect, it } from "vitest";
import type { AnalysisReport } from "../../src/domain/report.js";
import { DAY_MS } from "../../src/domain/settings.js";
import { noteDecision } from "../../src/policy/note-decision.js";
import type { OutgoingMessage } from "../../src/ports/chat-platform.js";
import { ManualClock } from "../../src/ports/clock.js";
import type { Store } from "../../src/ports/store.js";
import { FACILITATORS_DELIVERY, type NoteComposition } from "../../src/schedule/scheduler-deps.js";
import { createMemoryStore } from "../../src/store/memory-store.js";
import { makeReport } from "../policy/report-builders.js";
import { HOUR, MINUTE, makeScheduler, message, runUntil, settingsMap } from "./harness.js";

const KEY = "notes-test-key-0123456789abcdef0123456789";
const START = Date.UTC(2026, 10, 2, 10, 0);

/** composeNote as the composition root wires it: analysis (here a scripted report) + policy. */
function composeWith(
  store: Store,
  reportAt: (now: number) => AnalysisReport,
  notes: "channel" | "facilitators",
  calls: number[],
) {
  return async (channel: string, now: number): Promise<NoteComposition | null> => {
    calls.push(now);
    const decision = await noteDecision(store, channel, reportAt(now), now, notes);
    if (!decision.post || decision.audience === null) return null;
    return {
      message: message(`note ${channel}`),
      audience: decision.audience,
      member: decision.member,
      onPosted: () => decision.commit(),
    };
  };
}

describe("balance notes on the hourly schedule", () => {
  it("evaluates once an hour, posts one note, and another only after re-arming and 7 days", async () => {
    const store = createMemoryStore({ idKey: KEY });
    await store.registerChannel("c1", null);
    const clock = new ManualClock(START);
    // High for 3 days, calm on day 3, high again from day 4 on.
    const reportAt = (now: number) => {
      const day = Math.floor((now - START) / DAY_MS);
      return day === 3
        ? makeReport({ share: 0.2, pAbove: 0 })
        : makeReport({ share: 0.45, pAbove: 0.97 });
    };
    const calls: number[] = [];
    const { scheduler, platform } = makeScheduler({
      store,
      clock,
      readSettings: settingsMap({ c1: { digest: "off" } }),
      composeNote: composeWith(store, reportAt, "channel", calls),
    });
    await runUntil(clock, START + 14 * DAY_MS - 1, 15 * MINUTE, () => scheduler.tick());
    expect(calls).toHaveLength(14 * 24);
    expect(platform.posts.map((p) => p.at)).toEqual([START, START + 7 * DAY_MS]);
    const claim = await store.getClaim({
      channel: "c1",
      kind: "note",
      period: "2026-11-02T10:00Z",
    });
    expect(claim).toMatchObject({
      status: "posted",
      platformMessageId: platform.posts[0].messageId,
    });
    // The member the note concerns is kept as a member key, never as given.
    expect(claim?.member).toBe(store.memberKey("ana"));
  });

  it("sends to facilitators through the wired route, and skips when there is none", async () => {
    const store = createMemoryStore({ idKey: KEY });
    await store.registerChannel("c1", null);
    const clock = new ManualClock(START);
    const high = () => makeReport({ share: 0.5, pAbove: 1 });
    const sent: [string, OutgoingMessage][] = [];
    const routed = makeScheduler({
      store,
      clock,
      readSettings: settingsMap({ c1: { digest: "off", notes: "facilitators" } }),
      composeNote: composeWith(store, high, "facilitators", []),
      sendToFacilitators: async (channel, m) => {
        sent.push([channel, m]);
      },
    });
    const report = await routed.scheduler.tick();
    expect(report.posted).toMatchObject([
      { channel: "c1", kind: "note", audience: "facilitators", messageId: FACILITATORS_DELIVERY },
    ]);
    expect(sent.map(([c]) => c)).toEqual(["c1"]);
    expect(routed.platform.posts).toEqual([]);

    const other = createMemoryStore({ idKey: KEY });
    await other.registerChannel("c1", null);
    const unrouted = makeScheduler({
      store: other,
      clock,
      readSettings: settingsMap({ c1: { digest: "off", notes: "facilitators" } }),
      composeNote: composeWith(other, high, "facilitators", []),
    });
    const skipped = await unrouted.scheduler.tick();
    expect(skipped.skipped).toMatchObject([{ reason: "no-facilitator-route" }]);
    // Not posted, so not committed: the line stays armed.
    expect(await other.readChannelState("c1", "balance-note")).toBeNull();
  });

  it("never evaluates notes in a channel that turned them off", async () => {
    const store = createMemoryStore({ idKey: KEY });
    await store.registerChannel("c1", null);
    const clock = new ManualClock(START);
    const calls: number[] = [];
    const { scheduler, platform } = makeScheduler({
      store,
      clock,
      readSettings: settingsMap({ c1: { digest: "off", notes: "off" } }),
      composeNote: composeWith(
        store,
        () => makeReport({ share: 0.9, pAbove: 1 }),
        "channel",
        calls,
      ),
    });
    await runUntil(clock, START + 3 * DAY_MS, HOUR, () => scheduler.tick());
    expect(calls).toEqual([]);
    expect(platform.posts).toEqual([]);
  });

  it("lets one of two replicas post the hour's note; the other does not commit", async () => {
    const store = createMemoryStore({ idKey: KEY });
    await store.registerChannel("c1", null);
    const clock = new ManualClock(START);
    const high = () => makeReport({ share: 0.5, pAbove: 1 });
    const commits: string[] = [];
    const replica = (id: string) =>
      makeScheduler({
        store,
        clock,
        replicaId: id,
        readSettings: settingsMap({ c1: { digest: "off" } }),
        composeNote: async (channel, now) => {
          const note = await composeWith(store, high, "channel", [])(channel, now);
          return (
            note && {
              ...note,
              onPosted: async () => {
                commits.push(id);
                await note.onPosted?.();
              },
            }
          );
        },
      });
    const [a, b] = [replica("a"), replica("b")];
    const reports = await Promise.all([a.scheduler.tick(), b.scheduler.tick()]);
    expect(reports.flatMap((r) => r.posted)).toHaveLength(1);
    expect(reports.flatMap((r) => r.skipped.map((s) => s.reason))).toEqual(["claimed-elsewhere"]);
    expect(commits).toHaveLength(1);
    await runUntil(clock, START + 2 * DAY_MS, HOUR, async () => {
      await Promise.all([a.scheduler.tick(), b.scheduler.tick()]);
    });
    expect([...a.platform.posts, ...b.platform.posts]).toHaveLength(1);
  });
});
