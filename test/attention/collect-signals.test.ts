// Rules 7–9 of docs/event-semantics.md and DESIGN.md §4 steps 1–3, on hand-made logs.
import { describe, expect, it } from "vitest";
import { buildLedgers } from "../../src/attention/channel-ledger.js";
import { collectSignals, type SignalParams } from "../../src/attention/collect-signals.js";
import type { ChatEvent } from "../../src/domain/events.js";
import type { LedgerSnapshot } from "../../src/domain/ledger.js";
import {
  consentAll,
  day,
  makeConsent,
  makeDelete,
  makeGroup,
  makeMessage,
  makeUndelete,
} from "./ledger-builders.js";

const params = (until: number, overrides: Partial<SignalParams> = {}): SignalParams => ({
  until,
  windowDays: 28,
  halfLifeDays: 0,
  replyWeight: 1,
  mentionWeight: 1,
  ...overrides,
});

function snapshotOf(events: readonly ChatEvent[], until?: number): LedgerSnapshot {
  const snapshot = buildLedgers(events, { until }).get("c1");
  if (snapshot === undefined) throw new Error("no channel c1 in the test log");
  return snapshot;
}

const pairs = (set: ReturnType<typeof collectSignals>): string[] =>
  set.signals.map((s) => `${s.from}>${s.to}:${s.kind}`);

describe("consent at until", () => {
  it("a member whose consent is off at until contributes nothing, in either direction", () => {
    const events = [
      ...consentAll(["ana", "bo", "cy"], "counted", day(0)),
      makeMessage({ id: "m1", author: "ana", mentions: ["bo", "cy"], at: day(1) }),
      makeMessage({ id: "m2", author: "bo", parent: "m1", mentions: ["cy"], at: day(2) }),
      makeMessage({ id: "m3", author: "cy", parent: "m2", at: day(3) }),
      makeConsent("bo", "off", { at: day(4) }),
    ];
    const set = collectSignals(snapshotOf(events), params(day(5)));
    expect(pairs(set)).toEqual(["ana>cy:mention"]);
    expect(set.members).toEqual(["ana", "cy"]);
    // Before bo left, the same ledger counts all five signals.
    expect(collectSignals(snapshotOf(events), params(day(3.5))).count).toBe(5);
  });

  it("consent off at the message's time stops signals even if given later", () => {
    const events = [
      makeConsent("ana", "counted", { at: day(0) }),
      makeMessage({ id: "m1", author: "ana", mentions: ["bo"], at: day(1) }),
      makeMessage({ id: "m2", author: "bo", parentAuthor: "ana", at: day(1) }),
      makeConsent("bo", "counted", { at: day(2) }),
    ];
    const set = collectSignals(snapshotOf(events), params(day(3)));
    expect(set.count).toBe(0);
    expect(set.members).toEqual(["ana"]); // ana still wrote a counted message
  });
});

describe("signals of a message", () => {
  it("a reply that mentions its parent's author yields both signals", () => {
    const events = [
      ...consentAll(["ana", "bo"]),
      makeMessage({ id: "m1", author: "ana", at: day(0) }),
      makeMessage({ id: "m2", author: "bo", parent: "m1", mentions: ["ana"], at: day(0) }),
    ];
    expect(pairs(collectSignals(snapshotOf(events), params(day(1))))).toEqual([
      "bo>ana:reply",
      "bo>ana:mention",
    ]);
  });

  it("an edit's mention list counts at the message's time; delete and undelete switch it", () => {
    const base: ChatEvent[] = [
      ...consentAll(["ana", "bo", "cy"]),
      makeMessage({ id: "m1", author: "ana", mentions: ["bo"], at: day(1) }),
      { type: "edit", at: day(40), channel: "c1", id: "m1", mentions: ["cy"] },
    ];
    // The edit comes 39 days later, yet its signal keeps the message's day 1.
    const wide = params(day(40), { windowDays: 45 });
    const edited = collectSignals(snapshotOf(base), wide);
    expect(pairs(edited)).toEqual(["ana>cy:mention"]);
    expect(edited.signals[0].at).toBe(day(1));
    expect(collectSignals(snapshotOf(base), params(day(40))).count).toBe(0);

    const deleted = [...base, makeDelete("m1", day(40))];
    const afterDelete = collectSignals(snapshotOf(deleted), wide);
    expect(afterDelete.count).toBe(0);
    expect(afterDelete.members).toEqual([]); // a deleted message does not make its author active
    const restored = [...deleted, makeUndelete("m1", day(40))];
    expect(pairs(collectSignals(snapshotOf(restored), wide))).toEqual(["ana>cy:mention"]);
  });

  it("the window is (until − W, until]", () => {
    const events = [
      ...consentAll(["ana", "bo"]),
      makeMessage({ id: "old", author: "ana", mentions: ["bo"], at: day(0) }),
      makeMessage({ id: "new", author: "ana", mentions: ["bo"], at: day(7) }),
    ];
    const snapshot = snapshotOf(events);
    expect(collectSignals(snapshot, params(day(7), { windowDays: 7 })).count).toBe(1);
    expect(collectSignals(snapshot, params(day(7), { windowDays: 7.001 })).count).toBe(2);
    expect(collectSignals(snapshot, params(day(6.5), { windowDays: 7 })).count).toBe(1);
  });

  it("a kind with weight 0 yields no signals and makes nobody active", () => {
    const events = [
      ...consentAll(["ana", "bo", "cy"]),
      makeMessage({ id: "m1", author: "ana", at: day(0) }),
      makeMessage({ id: "m2", author: "bo", parent: "m1", mentions: ["cy"], at: day(0) }),
    ];
    const set = collectSignals(snapshotOf(events), params(day(1), { mentionWeight: 0 }));
    expect(pairs(set)).toEqual(["bo>ana:reply"]);
    expect(set.members).toEqual(["ana", "bo"]);
  });
});

describe("decay", () => {
  // By definition of a half-life, a weight aged exactly one half-life is halved (common practice).
  it("a signal aged one half-life weighs half; two weigh a quarter; H = 0 means none", () => {
    const events = [
      ...consentAll(["ana", "bo"]),
      makeMessage({ id: "m1", author: "ana", mentions: ["bo"], at: day(0) }),
      makeMessage({ id: "m2", author: "bo", parentAuthor: "ana", at: day(14) }),
    ];
    const snapshot = snapshotOf(events);
    const decayed = collectSignals(snapshot, params(day(28), { halfLifeDays: 14, windowDays: 29 }));
    expect(decayed.signals.map((s) => s.weight)).toEqual([0.25, 0.5]);
    expect(decayed.count).toBe(2); // counted before decay
    const weighted = collectSignals(
      snapshot,
      params(day(28), { halfLifeDays: 14, windowDays: 29, replyWeight: 3 }),
    );
    expect(weighted.signals[1].weight).toBeCloseTo(1.5, 12);
    const flat = collectSignals(snapshot, params(day(28), { halfLifeDays: 0, windowDays: 29 }));
    expect(flat.signals.map((s) => s.weight)).toEqual([1, 1]);
  });
});

describe("active members, names and labels", () => {
  it("lists active members sorted with named flags and labels at until", () => {
    const events = [
      makeConsent("zed", "named", { at: day(0) }),
      makeConsent("amy", "counted", { at: day(0) }),
      makeConsent("kit", "named", { at: day(0) }),
      makeConsent("kit", "counted", { at: day(2) }),
      makeConsent("lou", "named", { at: day(0) }),
      makeGroup("zed", "night", day(0)),
      makeGroup("amy", "day", day(0)),
      makeGroup("amy", null, day(2)),
      makeMessage({ id: "m1", author: "zed", mentions: ["kit"], at: day(1) }),
      makeMessage({ id: "m2", author: "amy", at: day(1) }),
    ];
    const set = collectSignals(snapshotOf(events), params(day(3)));
    expect(set.members).toEqual(["amy", "kit", "zed"]); // lou never wrote nor was addressed
    expect(set.named).toEqual([false, false, true]);
    expect(set.labels).toEqual([null, null, "night"]);
  });

  it("refuses impossible settings with SETTING_BAD_VALUE", () => {
    const snapshot = snapshotOf(consentAll(["ana"]));
    for (const bad of [{ windowDays: 0 }, { halfLifeDays: -1 }, { replyWeight: Number.NaN }]) {
      expect(() => collectSignals(snapshot, params(day(1), bad))).toThrow(
        expect.objectContaining({ code: "SETTING_BAD_VALUE" }),
      );
    }
  });
});
