import { describe, expect, it } from "vitest";
import { DAY_MS } from "../../src/domain/settings.js";
import { noteDecision } from "../../src/policy/note-decision.js";
import { createMemoryStore } from "../../src/store/memory-store.js";
import { makeReport } from "./report-builders.js";

const KEY = "policy-test-key-0123456789abcdef0123456789";
const T = Date.UTC(2026, 10, 2, 9, 0, 0);
const high = makeReport({ share: 0.42, pAbove: 0.93 });
const low = makeReport({ share: 0.2, pAbove: 0 });

describe("noteDecision", () => {
  it("posts once, writes the state only on commit, and re-arms without a post", async () => {
    const store = createMemoryStore({ idKey: KEY });
    const first = await noteDecision(store, "c1", high, T, "channel");
    expect(first).toMatchObject({
      post: true,
      reason: "crossed",
      audience: "channel",
      member: "ana",
    });
    expect(first.previous).toBeNull();
    // Not committed (say the post failed): the line is still armed.
    expect(await store.readChannelState("c1", "balance-note")).toBeNull();
    expect((await noteDecision(store, "c1", high, T + 3_600_000, "channel")).post).toBe(true);

    await first.commit();
    expect(await store.readChannelState("c1", "balance-note")).toEqual({
      version: 1,
      armed: false,
      lastNoteAt: T,
    });
    const again = await noteDecision(store, "c1", high, T + 3_600_000, "channel");
    expect(again).toMatchObject({ post: false, reason: "waiting-to-rearm", audience: null });

    // Falling below line − 0.05 re-arms at once, with no post and no commit needed.
    const calm = await noteDecision(store, "c1", low, T + DAY_MS, "channel");
    expect(calm.post).toBe(false);
    expect(await store.readChannelState("c1", "balance-note")).toEqual({
      version: 1,
      armed: true,
      lastNoteAt: T,
    });
    const soon = await noteDecision(store, "c1", high, T + 2 * DAY_MS, "channel");
    expect(soon).toMatchObject({ post: false, reason: "cooldown" });
    const week = await noteDecision(store, "c1", high, T + 7 * DAY_MS, "facilitators");
    expect(week).toMatchObject({ post: true, audience: "facilitators" });
  });

  it("keeps channels apart and never posts with notes off", async () => {
    const store = createMemoryStore({ idKey: KEY });
    const c1 = await noteDecision(store, "c1", high, T, "channel");
    await c1.commit();
    expect((await noteDecision(store, "c2", high, T, "channel")).post).toBe(true);
    const off = await noteDecision(store, "c3", high, T, "off");
    expect(off).toMatchObject({ post: false, reason: "notes-off" });
    await off.commit();
    expect(await store.readChannelState("c3", "balance-note")).toBeNull();
  });
});
