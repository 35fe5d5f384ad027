// Each case checks one rule of docs/event-semantics.md (the project's event contract) on a
// hand-made log small enough to work out by hand.
import { describe, expect, it } from "vitest";
import {
  buildLedgers,
  ChannelLedger,
  latestEventTime,
} from "../../src/attention/channel-ledger.js";
import { formatAt, formatPeriods } from "../../src/attention/format-periods.js";
import { consentLevelAt, groupLabelAt } from "../../src/attention/timeline.js";
import type { ChatEvent } from "../../src/domain/events.js";
import type { LedgerMessage } from "../../src/domain/ledger.js";
import {
  consentAll,
  day,
  makeConsent,
  makeDelete,
  makeEdit,
  makeGroup,
  makeMessage,
  makeUndelete,
  T0,
} from "./ledger-builders.js";

function ledgerOf(events: readonly ChatEvent[]): ChannelLedger {
  const ledger = new ChannelLedger("c1");
  for (const event of events) ledger.apply(event);
  return ledger;
}

function message(ledger: ChannelLedger, id: string): LedgerMessage | undefined {
  return ledger.snapshot().messages.find((m) => m.id === id);
}

describe("rule 1: consent by time", () => {
  it("is off without a change, else the latest change at or before t", () => {
    const ledger = ledgerOf([
      makeConsent("ana", "counted", { at: day(1) }),
      makeConsent("ana", "named", { at: day(3) }),
    ]);
    expect(ledger.consentAt("bo", day(5))).toBe("off");
    expect(ledger.consentAt("ana", day(0.5))).toBe("off");
    expect(ledger.consentAt("ana", day(1))).toBe("counted");
    expect(ledger.consentAt("ana", day(2.9))).toBe("counted");
    expect(ledger.consentAt("ana", day(3))).toBe("named");
  });

  it("lets the later applied change win a tie, and places late-arriving changes by time", () => {
    const events = [
      makeConsent("ana", "named", { at: day(1) }),
      makeConsent("ana", "off", { at: day(1) }),
      makeConsent("ana", "counted", { at: day(3) }),
      makeConsent("ana", "named", { at: day(2) }), // arrives last, applies from day 2 to day 3
    ];
    const ledger = ledgerOf(events);
    expect(ledger.consentAt("ana", day(1))).toBe("off");
    expect(ledger.consentAt("ana", day(2.5))).toBe("named");
    expect(ledger.consentAt("ana", day(4))).toBe("counted");
    // The pure helper agrees on the snapshot's changes at every probe time.
    const changes = ledger.snapshot().consent;
    for (const t of [day(0), day(1), day(1.5), day(2), day(2.5), day(3), day(9)]) {
      expect(consentLevelAt(changes, "ana", t)).toBe(ledger.consentAt("ana", t));
    }
  });
});

describe("rule 2: messages", () => {
  it("stores nothing for an author without consent at the message's time", () => {
    const ledger = ledgerOf([
      makeMessage({ id: "m1", author: "ana", at: day(0) }),
      makeConsent("ana", "counted", { at: day(1) }),
    ]);
    expect(ledger.snapshot().messages).toEqual([]);
  });

  it("keeps the first message of an id", () => {
    const ledger = ledgerOf([
      ...consentAll(["ana", "bo"]),
      makeMessage({ id: "m1", author: "ana", at: day(1) }),
      makeMessage({ id: "m1", author: "bo", at: day(2) }),
    ]);
    expect(ledger.snapshot().messages.map((m) => [m.id, m.author, m.at])).toEqual([
      ["m1", "ana", day(1)],
    ]);
  });

  it("resolves parentAuthor from the parent's id, or takes the event's", () => {
    const ledger = ledgerOf([
      ...consentAll(["ana", "bo", "cy"]),
      makeMessage({ id: "m1", author: "ana", at: day(1) }),
      makeMessage({ id: "m2", author: "bo", parent: "m1", at: day(2) }),
      makeMessage({ id: "m3", author: "cy", parent: "gone", parentAuthor: "bo", at: day(2) }),
      makeMessage({ id: "m4", author: "cy", parent: "unknown", at: day(2) }),
      makeMessage({ id: "m5", author: "ana", parent: "m1", at: day(3) }),
    ]);
    expect(message(ledger, "m2")?.parentAuthor).toBe("ana");
    expect(message(ledger, "m3")?.parentAuthor).toBe("bo");
    expect(message(ledger, "m4")?.parentAuthor).toBeNull();
    expect(message(ledger, "m5")?.parentAuthor).toBeNull(); // answering oneself is no signal
  });

  it("drops a parent author or mention not consenting at the message's time", () => {
    const ledger = ledgerOf([
      makeConsent("ana", "counted", { at: day(0) }),
      makeConsent("bo", "counted", { at: day(0) }),
      makeConsent("cy", "named", { at: day(5) }),
      makeMessage({ id: "m1", author: "ana", parentAuthor: "cy", mentions: ["cy"], at: day(1) }),
      makeMessage({ id: "m2", author: "ana", parentAuthor: "cy", mentions: ["cy"], at: day(6) }),
    ]);
    expect(message(ledger, "m1")).toMatchObject({ parentAuthor: null, mentions: [] });
    expect(message(ledger, "m2")).toMatchObject({ parentAuthor: "cy", mentions: ["cy"] });
  });

  it("keeps distinct mentions other than the author, sorted", () => {
    const ledger = ledgerOf([
      ...consentAll(["ana", "bo", "cy", "Dee"]),
      makeMessage({ id: "m1", author: "ana", mentions: ["cy", "ana", "bo", "cy", "Dee", "zed"] }),
    ]);
    // Code-unit order: upper case sorts before lower case.
    expect(message(ledger, "m1")?.mentions).toEqual(["Dee", "bo", "cy"]);
  });
});

describe("rule 3: edits", () => {
  it("replaces the mention list, filtered at the message's own time", () => {
    const ledger = ledgerOf([
      ...consentAll(["ana", "bo", "cy"], "counted", day(0)),
      makeConsent("dee", "counted", { at: day(2) }),
      makeMessage({ id: "m1", author: "ana", mentions: ["bo"], at: day(1) }),
      makeEdit("m1", ["cy", "dee", "ana"], day(3)),
      makeEdit("m9", ["bo"], day(3)),
    ]);
    // dee consented only after the message was written, so the edit cannot add her.
    expect(message(ledger, "m1")).toMatchObject({ at: day(1), mentions: ["cy"] });
    expect(ledger.snapshot().messages).toHaveLength(1);
  });
});

describe("rule 4: delete and undelete", () => {
  it("marks and clears; unknown ids are ignored", () => {
    const ledger = ledgerOf([...consentAll(["ana"]), makeMessage({ id: "m1", author: "ana" })]);
    ledger.apply(makeDelete("m1", day(1)));
    ledger.apply(makeDelete("zz", day(1)));
    expect(message(ledger, "m1")?.deleted).toBe(true);
    ledger.apply(makeUndelete("m1", day(2)));
    expect(message(ledger, "m1")?.deleted).toBe(false);
    expect(ledger.snapshot().messages).toHaveLength(1);
  });
});

describe("rule 5: group labels", () => {
  it("takes the latest change at or before t; null clears", () => {
    const ledger = ledgerOf([
      makeGroup("cy", "night-shift", day(1)),
      makeGroup("cy", null, day(3)),
      makeGroup("bo", "day-shift", day(2)),
    ]);
    expect(ledger.groupAt("cy", day(0))).toBeNull();
    expect(ledger.groupAt("cy", day(2))).toBe("night-shift");
    expect(ledger.groupAt("cy", day(3))).toBeNull();
    const groups = ledger.snapshot().groups;
    expect(groups.map((g) => g.member)).toEqual(["cy", "cy", "bo"]); // applied order
    expect(groupLabelAt(groups, "cy", day(2))).toBe("night-shift");
    expect(groupLabelAt(groups, "cy", day(4))).toBeNull();
    expect(groupLabelAt(groups, "bo", day(4))).toBe("day-shift");
  });
});

describe("rule 6 and snapshots", () => {
  it("applies only events at or before until, one ledger per channel", () => {
    const events: ChatEvent[] = [
      ...consentAll(["ana", "bo"]),
      makeMessage({ id: "m1", author: "ana", mentions: ["bo"], at: day(1) }),
      makeDelete("m1", day(3)),
      makeMessage({ id: "m2", author: "bo", at: day(4) }),
      { ...makeConsent("ana", "named"), channel: "c2" },
      { ...makeMessage({ id: "x1", author: "ana" }), channel: "c2", at: day(9) },
    ];
    const ledgers = buildLedgers(events, { until: day(2) });
    expect([...ledgers.keys()]).toEqual(["c1", "c2"]);
    const c1 = ledgers.get("c1");
    expect(c1?.messages.map((m) => [m.id, m.deleted])).toEqual([["m1", false]]);
    expect(c1?.lastEventAt).toBe(day(1));
    expect(ledgers.get("c2")?.messages).toEqual([]);
    expect(ledgers.get("c2")?.lastEventAt).toBe(T0);
    expect(
      buildLedgers(events)
        .get("c1")
        ?.messages.map((m) => [m.id, m.deleted]),
    ).toEqual([
      ["m1", true],
      ["m2", false],
    ]);
    expect(latestEventTime(events)).toBe(day(9));
    expect(latestEventTime([])).toBeNull();
  });

  it("orders messages by time, then id, whatever the arrival order", () => {
    const ledger = ledgerOf([
      ...consentAll(["ana"]),
      makeMessage({ id: "b", author: "ana", at: day(2) }),
      makeMessage({ id: "c", author: "ana", at: day(1) }),
      makeMessage({ id: "a", author: "ana", at: day(2) }),
    ]);
    expect(ledger.snapshot().messages.map((m) => m.id)).toEqual(["c", "a", "b"]);
  });

  it("refuses an event of another channel", () => {
    expect(() => ledgerOf([{ ...makeDelete("m"), channel: "c9" }])).toThrow(/channel "c9"/);
  });
});

describe("format periods (DESIGN.md §3)", () => {
  const fmt = (format: string | null, at: number): ChatEvent => ({
    type: "format",
    at,
    channel: "c1",
    format,
  });
  it("keeps format changes in applied order and cuts them into periods by time", () => {
    const ledger = ledgerOf([
      fmt("written-first", day(1)),
      fmt(null, day(8)),
      fmt("rotating-hosts", day(10)),
      fmt("written-first", day(5)), // late arrival, same format: no split
    ]);
    const formats = ledger.snapshot().formats ?? [];
    expect(formats.map((f) => f.format)).toEqual([
      "written-first",
      null,
      "rotating-hosts",
      "written-first",
    ]);
    expect(formatAt(formats, day(0))).toBeNull();
    expect(formatAt(formats, day(6))).toBe("written-first");
    expect(formatAt(formats, day(9))).toBeNull();
    expect(formatPeriods(formats, day(12))).toEqual([
      { format: "written-first", start: day(1), end: day(8), open: false },
      { format: "rotating-hosts", start: day(10), end: day(12), open: true },
    ]);
    // A period starting after `until` does not exist yet.
    expect(formatPeriods(formats, day(9)).map((p) => p.format)).toEqual(["written-first"]);
  });
});
