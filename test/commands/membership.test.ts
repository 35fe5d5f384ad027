/**
 * `join`, `leave`, `me` and `status` (DESIGN.md §6, §7): consent is recorded through ingestion
 * with the notice's version and the member then counts; leaving erases the member's rows and they
 * drop out of the next check; too little data explains itself with numbers.
 */
import { describe, expect, it } from "vitest";
import { analyzeSnapshot } from "../../src/analysis/analyze-snapshot.js";
import { consentAt, snapshotIds } from "../../src/commands/member-view.js";
import {
  analysisSettingsFor,
  DEFAULT_CHANNEL_SETTINGS,
} from "../../src/domain/channel-settings.js";
import { CONSENT_NOTICE_VERSION } from "../../src/report/consent-notice.js";
import { percent, percentRange } from "../../src/report/format.js";
import { busyChannel, CHANNEL, DAY, mentions, NOW, runner, T0 } from "./channel-fixture.js";

const settings = analysisSettingsFor(DEFAULT_CHANNEL_SETTINGS);

describe("join", () => {
  it("shows the notice, then records `counted` with the notice version", async () => {
    const r = await runner();
    const response = await r.run("UBO", "join", { now: T0 });
    const text = response.message.text;
    expect(response.visibility).toBe("private");
    // The notice comes first and covers what the issue asks for.
    expect(text.indexOf("Before you join")).toBe(0);
    for (const part of [
      "replies and mentions",
      "never stored",
      "links, files",
      "Who can see what",
      "/influence leave",
      "rough proxy",
      "HR decision",
      CONSENT_NOTICE_VERSION,
    ]) {
      expect(text).toContain(part);
    }
    expect(text.indexOf("You are in as counted")).toBeGreaterThan(text.indexOf("How to leave"));
    const snapshot = await r.store.loadSnapshot(CHANNEL);
    const [pseudonym] = snapshot.consent.map((c) => c.member);
    expect(snapshot.consent).toEqual([
      { member: pseudonym, at: T0, level: "counted", notice: CONSENT_NOTICE_VERSION },
    ]);
    // A counted member's platform id is not kept.
    expect(pseudonym).toBe(snapshotIds(r.store, "UBO")[1]);
  });

  it("join named keeps the platform id; joining twice at the same level changes nothing", async () => {
    const r = await runner();
    await r.run("UANA", "join named", { now: T0 });
    const again = await r.run("UANA", "join named", { now: T0 + 1000 });
    expect(again.message.text).toContain("already in as named");
    const snapshot = await r.store.loadSnapshot(CHANNEL);
    expect(snapshot.consent).toHaveLength(1);
    expect(snapshot.consent[0].member).toBe("UANA");
    expect(consentAt(snapshot, snapshotIds(r.store, "UANA"), T0)).toBe("named");
    // Back to counted: the platform id is forgotten.
    await r.run("UANA", "join", { now: T0 + 2000 });
    const after = await r.store.loadSnapshot(CHANNEL);
    expect(after.consent.every((c) => c.member !== "UANA")).toBe(true);
    expect(consentAt(after, snapshotIds(r.store, "UANA"), T0 + 2000)).toBe("counted");
  });

  it("join with an unknown word is refused and records nothing", async () => {
    const r = await runner();
    const response = await r.run("UBO", "join loudly");
    expect(response.message.text).toContain('takes nothing, or "named"; not "loudly"');
    expect((await r.store.loadSnapshot(CHANNEL)).consent).toHaveLength(0);
  });

  it("a member who joined then counts; one who did not, does not", async () => {
    const r = await busyChannel();
    // Gus mentions Ana before joining: nothing of it is kept.
    await mentions(r.store, { from: "UGUS", to: "UANA", times: 5, at: T0 + 2 * DAY });
    const before = analyzeSnapshot(await r.store.loadSnapshot(CHANNEL), settings, { until: NOW });
    expect(before.members).toBe(6);
    await r.run("UGUS", "join", { now: T0 + 3 * DAY });
    await mentions(r.store, { from: "UGUS", to: "UANA", times: 3, at: T0 + 4 * DAY });
    const after = analyzeSnapshot(await r.store.loadSnapshot(CHANNEL), settings, { until: NOW });
    expect(after.members).toBe(7);
    expect(after.signals).toBe(before.signals + 3);
    const me = (await r.run("UGUS", "me")).message.text;
    expect(me).toContain("Your share");
  });
});

describe("leave", () => {
  it("erases the member's rows, says so, and they drop out of the next check", async () => {
    const r = await busyChannel();
    const before = (await r.run("UBO", "check")).message.text;
    expect(before).toMatch(/Active members\s+6/);
    const response = await r.run("UBO", "leave");
    expect(response.message.text).toMatch(
      /Done: you are no longer counted in this channel, and \d+ stored records/,
    );
    const snapshot = await r.store.loadSnapshot(CHANNEL);
    const ids = snapshotIds(r.store, "UBO");
    expect(snapshot.consent.some((c) => ids.includes(c.member))).toBe(false);
    expect(
      snapshot.messages.some(
        (m) => ids.includes(m.author) || m.mentions.some((x) => ids.includes(x)),
      ),
    ).toBe(false);
    const after = (await r.run("UCY", "check")).message.text;
    expect(after).toMatch(/Active members\s+5/);
    expect((await r.run("UBO", "me")).message.text).toContain("You are not counted");
  });

  it("with nothing stored, says there was nothing to delete", async () => {
    const r = await runner();
    expect((await r.run("UBO", "leave")).message.text).toContain("nothing to delete");
  });

  it("an added facilitator who leaves loses the role too", async () => {
    const r = await busyChannel();
    await r.run("UBOSS", "facilitator add UCY");
    const text = (await r.run("UCY", "leave")).message.text;
    expect(text).toContain("facilitator role in this channel was removed");
    expect(await r.store.isFacilitator(CHANNEL, "UCY")).toBe(false);
  });
});

describe("me and status", () => {
  it("me gives the reader's own share, interval and chance of being above the line", async () => {
    const r = await busyChannel();
    const report = analyzeSnapshot(await r.store.loadSnapshot(CHANNEL), settings, { until: NOW });
    const entry = report.influence?.find((e) => e.member === snapshotIds(r.store, "UCY")[1]);
    if (!entry || !report.line) throw new Error("the busy channel must have figures and a line");
    const text = (await r.run("UCY", "me")).message.text;
    expect(text).toContain(
      `${percent(entry.share)}, interval ${percentRange(entry.low, entry.high)}`,
    );
    expect(text).toContain(`Above the ${percent(report.line.threshold)} line`);
    expect(text).toContain(`probability ${percent(entry.pAbove)}`);
    expect(text).toContain("shown only to you");
  });

  it("me explains how to join to someone not counted", async () => {
    const r = await busyChannel();
    const text = (await r.run("UGUS", "me")).message.text;
    expect(text).toContain("You are not counted in this channel");
    expect(text).toContain("/influence join");
  });

  it("status gives consent, opted-in and active members, signals and settings", async () => {
    const r = await busyChannel();
    await r.run("UGUS", "join named", { now: T0 + 2 * DAY });
    const text = (await r.run("UGUS", "status")).message.text;
    expect(text).toContain("named (counted; your name may be shown) since 2026-11-04");
    expect(text).toContain(`notice ${CONSENT_NOTICE_VERSION}`);
    expect(text).toMatch(/Opted-in members\s+7/);
    expect(text).toMatch(/In the window\s+6 active members, 42 signals/);
    expect(text).toMatch(/Your role\s+member/);
    expect(text).toMatch(/window\s+28 days/);
    expect((await r.run("UBOSS", "status")).message.text).toMatch(/Your role\s+facilitator/);
  });
});

describe("too little data explains itself with numbers", () => {
  it("check, me and status say how many members and signals are missing", async () => {
    const r = await runner();
    for (const m of ["UANA", "UBO", "UCY"]) await r.run(m, "join", { now: T0 });
    await mentions(r.store, { from: "UANA", to: "UBO", times: 4, at: T0 + DAY });
    await mentions(r.store, { from: "UBO", to: "UCY", times: 3, at: T0 + DAY });
    // 3 active members and 7 signals; the defaults need 5 members and 20 signals.
    const check = (await r.run("UANA", "check")).message.text;
    expect(check).toContain("3 active opted-in members and 7 signals");
    expect(check).toContain("2 more opted-in members taking part");
    expect(check).toContain("13 more replies or mentions");
    const me = (await r.run("UANA", "me")).message.text;
    expect(me).toContain("2 more opted-in members taking part and 13 more replies or mentions");
    const status = (await r.run("UANA", "status")).message.text;
    expect(status).toMatch(/Figures\s+not yet/);
    expect(status).toContain("Figures need 2 more opted-in members");
  });

  it("a lower minmembers setting lets the same channel show figures", async () => {
    const r = await runner();
    for (const m of ["UANA", "UBO", "UCY"]) await r.run(m, "join", { now: T0 });
    for (const [from, to] of [
      ["UANA", "UBO"],
      ["UBO", "UCY"],
      ["UCY", "UANA"],
    ] as const) {
      await mentions(r.store, { from, to, times: 7, at: T0 + DAY });
    }
    expect((await r.run("UANA", "check")).message.text).toContain(
      "2 more opted-in members taking part",
    );
    await r.run("UBOSS", "set minmembers 3");
    expect((await r.run("UANA", "check")).message.text).toMatch(/Effective voices\s+3\.0 of 3/);
  });
});
