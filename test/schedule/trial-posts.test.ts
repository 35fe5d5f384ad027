/**
 * A format trial's posts through the scheduler, with a manual clock: each week's switch and the
 * result are posted once, whether two replicas share one database, a replica restarts, or the
 * hint in the trial's state is lost; a replica that dies mid-post is never repeated; a switch
 * found more than a day late is recorded as missed. The schedule under test is the
 * alternating-treatments design (Barlow & Hersen 1984, "Single Case Experimental Designs", 2nd
 * ed., Pergamon; from memory): ABAB, one week each.
 */
import { mkdtempSync } from "node:fs";
import { tmpdir } from "node:os";
import { join } from "node:path";
import { afterEach, describe, expect, it } from "vitest";
import { formatAt } from "../../src/attention/format-periods.js";
import { readTrial } from "../../src/commands/format-commands.js";
import { dueTrialPosts } from "../../src/commands/trial-posts.js";
import { ManualClock } from "../../src/ports/clock.js";
import type { Store } from "../../src/ports/store.js";
import { openSqliteStore } from "../../src/store/open-store.js";
import { CHANNEL, DAY, mentions, runner, T0 } from "../commands/channel-fixture.js";
import { TEST_KEY } from "../store/test-key.js";
import { HOUR, makeScheduler, RecordingPlatform, runUntil, settingsMap } from "./harness.js";

const MEMBERS = ["UANA", "UBO", "UCY", "UDEE", "UELI", "UFAY", "UGUS"];
const WEEK = 7 * DAY;
const open: Store[] = [];

afterEach(async () => {
  for (const store of open.splice(0)) await store.close();
});

async function sharedSqlite(): Promise<[Store, Store]> {
  const path = join(mkdtempSync(join(tmpdir(), "plumbline-trial-")), "db.sqlite");
  const a = await openSqliteStore(path, { idKey: TEST_KEY });
  const b = await openSqliteStore(path, { idKey: TEST_KEY });
  open.push(a, b);
  await a.registerChannel(CHANNEL, null);
  return [a, b];
}

/**
 * A seven-member channel with a 4-week trial of coordinator-led (A) and rotating-hosts (B) from
 * T0: every day each member mentions the next two; in A's weeks everyone also mentions UANA.
 */
async function trialChannel(store: Store): Promise<void> {
  const r = await runner({ store, now: T0 });
  for (const m of MEMBERS) await r.run(m, "join", { now: T0 });
  await r.run("UBOSS", "format trial coordinator-led rotating-hosts weeks 4", { now: T0 });
  for (let d = 0; d < 28; d++) {
    const at = T0 + d * DAY + 2 * HOUR;
    const lead = Math.floor(d / 7) % 2 === 0;
    for (let i = 0; i < MEMBERS.length; i++) {
      for (const k of [1, 2]) {
        const to = MEMBERS[(i + k) % MEMBERS.length];
        await mentions(store, { from: MEMBERS[i], to, times: 1, at: at + k * 60_000 });
      }
      if (lead && i > 0) {
        await mentions(store, { from: MEMBERS[i], to: "UANA", times: 3, at: at + 600_000 });
      }
    }
  }
}

const quiet = settingsMap({ [CHANNEL]: { digest: "off", notes: "off" } });

function replica(store: Store, clock: ManualClock, id: string, platform: RecordingPlatform) {
  return makeScheduler({
    store,
    clock,
    replicaId: id,
    platform,
    readSettings: quiet,
    duePosts: (channel, now) => dueTrialPosts(store, channel, now),
  });
}

describe("a format trial's posts", () => {
  it("posts weeks 2–4 and the result once each across two replicas and a restart", async () => {
    const [a, b] = await sharedSqlite();
    await trialChannel(a);
    const clock = new ManualClock(T0);
    const platform = new RecordingPlatform(clock, "p");
    const r1 = replica(a, clock, "r1", platform);
    const r2 = replica(b, clock, "r2", platform);
    await runUntil(clock, T0 + 29 * DAY, HOUR, async () => {
      await r1.scheduler.tick();
      await r2.scheduler.tick();
    });
    const heads = platform.posts.map((p) => [p.text.split("\n")[0], p.at - T0]);
    expect(heads).toEqual([
      ["Format trial · week 2 of 4: rotating-hosts", WEEK],
      ["Format trial · week 3 of 4: coordinator-led", 2 * WEEK],
      ["Format trial · week 4 of 4: rotating-hosts", 3 * WEEK],
      ["Format trial result: coordinator-led against rotating-hosts · C-TEAM", 4 * WEEK],
    ]);
    const result = platform.posts[3].text;
    expect(result).toMatch(/"rotating-hosts" spread influence more evenly than "coordinator-led"/);
    expect(result).toContain("not a measure of anyone's worth");
    // The even format's balance is printed above its range (the known ceiling effect), so the
    // post says why; the concentrated one's is inside its range and gets no such note.
    expect(result).toMatch(/rotating-hosts +balance 1\.00 \(0\.\d\d–0\.9\d\)/);
    expect(result).toContain("For rotating-hosts the range lies just below the figure");
    expect(result).not.toContain("For coordinator-led the range");
    // The switches are in the ledger at their planned times.
    const snapshot = await b.loadSnapshot(CHANNEL);
    expect(formatAt(snapshot.formats ?? [], T0 + WEEK + 1)).toBe("rotating-hosts");
    expect(formatAt(snapshot.formats ?? [], T0 + 4 * WEEK + 1)).toBeNull();
    // A restarted replica (a new scheduler, nothing in memory) posts nothing again, even with the
    // trial's "posted" hint lost: the claim rows decide.
    const trial = await readTrial(a, CHANNEL);
    if (trial === null) throw new Error("no trial");
    await a.writeChannelState(CHANNEL, "format-trial", { ...trial, verdictPosted: false });
    const restarted = replica(b, clock, "r3", platform);
    const report = await restarted.scheduler.tick();
    expect(platform.posts).toHaveLength(4);
    expect(report.posted).toEqual([]);
    const claim = await a.getClaim({
      channel: CHANNEL,
      kind: "trial",
      period: "trial 2026-11-02T09:00Z result",
    });
    expect(claim).toMatchObject({
      status: "posted",
      platformMessageId: platform.posts[3].messageId,
    });
  });

  it("never repeats a result whose post may have reached the channel, and records a late switch as missed", async () => {
    const [a, b] = await sharedSqlite();
    await trialChannel(a);
    // The schedulers were down from day 6 to day 9: week 2's switch is two days late.
    const clock = new ManualClock(T0 + 9 * DAY);
    const platform = new RecordingPlatform(clock, "p");
    const r1 = replica(a, clock, "r1", platform);
    const late = await r1.scheduler.tick();
    expect(late.missed).toEqual([
      {
        channel: CHANNEL,
        kind: "trial",
        period: "trial 2026-11-02T09:00Z week 2",
        claimedBy: "r1",
        reason: "too-late",
      },
    ]);
    expect(platform.posts).toEqual([]);
    // …but the switch itself was recorded when first seen.
    expect(formatAt((await a.loadSnapshot(CHANNEL)).formats ?? [], T0 + 9 * DAY)).toBe(
      "rotating-hosts",
    );
    // r1 starts posting the result and hangs (it dies mid-call); r2 never posts it again.
    clock.set(T0 + 28 * DAY + HOUR);
    const dying = new RecordingPlatform(clock, "dying");
    dying.hang = true;
    const r1b = replica(a, clock, "r1", dying);
    void r1b.scheduler.tick();
    await new Promise<void>((resolve) => {
      dying.onPost = resolve;
    });
    const r2 = replica(b, clock, "r2", platform);
    await runUntil(clock, T0 + 30 * DAY, HOUR, () => r2.scheduler.tick());
    expect(platform.posts).toEqual([]);
    const claim = await b.getClaim({
      channel: CHANNEL,
      kind: "trial",
      period: "trial 2026-11-02T09:00Z result",
    });
    expect(claim?.status).toBe("missed");
    expect(claim?.platformMessageId).toContain("outcome unknown");
  });
});
