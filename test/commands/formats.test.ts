/**
 * `format <name>|end|list`, `format trial A B weeks N` and `compare formats [A B]` through
 * `handleCommand` on an invented seven-member channel (SQLite in memory). The trial's schedule is
 * the alternating-treatments design (Barlow & Hersen 1984, "Single Case Experimental Designs",
 * 2nd ed., Pergamon; from memory): formats take turns week by week.
 */
import { describe, expect, it } from "vitest";
import { digestFormatLine } from "../../src/commands/format-commands.js";
import { dueTrialPosts } from "../../src/commands/trial-posts.js";
import { CHANNEL, DAY, mentions, runner, T0 } from "./channel-fixture.js";

const MEMBERS = ["UANA", "UBO", "UCY", "UDEE", "UELI", "UFAY", "UGUS"];

async function channelWith(
  r: Awaited<ReturnType<typeof runner>>,
  from: number,
  days: number,
  lead: boolean,
) {
  // Each day every member mentions two others; under `lead` everyone also mentions UANA 4 times.
  for (let d = 0; d < days; d++) {
    const at = from + d * DAY + 3_600_000;
    for (let i = 0; i < MEMBERS.length; i++) {
      for (const k of [1, 2]) {
        await mentions(r.store, {
          from: MEMBERS[i],
          to: MEMBERS[(i + k) % MEMBERS.length],
          times: 1,
          at: at + k * 60_000,
        });
      }
      if (lead && i > 0)
        await mentions(r.store, { from: MEMBERS[i], to: "UANA", times: 4, at: at + 10 * 60_000 });
    }
  }
}

describe("format commands", () => {
  it("starts, lists and ends formats (facilitators only) and compares them", async () => {
    const r = await runner({ now: T0 });
    for (const m of MEMBERS) await r.run(m, "join", { now: T0 });
    const refused = await r.run("UBO", "format written-first", { now: T0 + 1 });
    expect(refused.message.text).toMatch(/facilitator/i);
    const started = await r.run("UBOSS", "format coordinator-led", { now: T0 + 1 });
    expect(started.message.text).toContain("The format is now coordinator-led");
    await channelWith(r, T0, 7, true);
    const switched = await r.run("UBOSS", "format rotating-hosts", { now: T0 + 7 * DAY });
    expect(switched.message.text).toContain("(was coordinator-led)");
    await channelWith(r, T0 + 7 * DAY, 7, false);
    const list = await r.run("UBO", "format list", { now: T0 + 14 * DAY });
    expect(list.message.text).toMatch(/coordinator-led\s+2026-11-02\.\.2026-11-09/);
    expect(list.message.text).toMatch(/rotating-hosts\s+2026-11-09\.\.now/);
    const compared = await r.run("UBO", "compare formats", { now: T0 + 14 * DAY });
    const text = compared.message.text;
    expect(text).toContain("Formats compared");
    expect(text).toMatch(/"rotating-hosts" spread influence more evenly than "coordinator-led"/);
    // One format only before the other, on a channel that did not drift: no time warning.
    expect(text).not.toContain("drifted week by week");
    expect(await digestFormatLine(r.store, CHANNEL, T0 + 14 * DAY)).toMatch(
      /^Format now: rotating-hosts, balance so far [01]\.\d\d against 0\.\d\d under coordinator-led; the chance it is more balanced is (over 99%|\d+%)\.$/,
    );
    const ended = await r.run("UBOSS", "format end", { now: T0 + 14 * DAY });
    expect(ended.message.text).toContain("The format rotating-hosts has ended");
    expect((await r.run("UBOSS", "format end", { now: T0 + 14 * DAY + 1 })).message.text).toContain(
      "nothing to end",
    );
    expect(await digestFormatLine(r.store, CHANNEL, T0 + 15 * DAY)).toBeNull();
    const bad = await r.run("UBOSS", "compare formats nope rotating-hosts", { now: T0 + 14 * DAY });
    expect(bad.message.text).toContain('There is no format "nope"');
    const reserved = await r.run("UBOSS", "format trial", { now: T0 + 14 * DAY });
    expect(reserved.message.text).toMatch(/two formats and a number of weeks/);
  });

  it("plans a trial, switches at week boundaries, has each week's switch and then its result due", async () => {
    const r = await runner({ now: T0 });
    for (const m of MEMBERS) await r.run(m, "join", { now: T0 });
    const planned = await r.run("UBOSS", "format trial coordinator-led rotating-hosts weeks 4", {
      now: T0 + 1,
    });
    expect(planned.visibility).toBe("channel");
    expect(planned.message.text).toContain(
      "week 1 (from 2026-11-02): coordinator-led; week 2 (from 2026-11-09): rotating-hosts",
    );
    const byHand = await r.run("UBOSS", "format written-first", { now: T0 + 2 });
    expect(byHand.message.text).toContain("cannot be changed by hand");
    for (let w = 0; w < 4; w++) {
      await channelWith(r, T0 + 1 + w * 7 * DAY, 7, w % 2 === 0);
      // Any command applies the switches that are due.
      const list = await r.run("UBO", "format list", { now: T0 + 1 + w * 7 * DAY + 3 * DAY });
      expect(list.message.text).toContain(
        `this week ${w % 2 === 0 ? "coordinator-led" : "rotating-hosts"}`,
      );
    }
    const lastWeek = await dueTrialPosts(r.store, CHANNEL, T0 + 27 * DAY);
    expect(lastWeek.map((p) => p.period)).toEqual(["trial 2026-11-02T09:00Z week 4"]);
    const week4 = await lastWeek[0].compose();
    expect(week4?.text).toContain("Format trial · week 4 of 4: rotating-hosts");
    expect(week4?.text).toContain("the bot posts the result on 2026-11-30");
    const due = await dueTrialPosts(r.store, CHANNEL, T0 + 28 * DAY + 2);
    expect(due.map((p) => [p.period, p.staleAt])).toEqual([
      ["trial 2026-11-02T09:00Z result", null],
    ]);
    const text = (await due[0].compose())?.text ?? "";
    expect(text).toContain("Format trial result: coordinator-led against rotating-hosts");
    expect(text).toMatch(/"rotating-hosts" spread influence more evenly/);
    await due[0].onPosted?.();
    expect(await dueTrialPosts(r.store, CHANNEL, T0 + 29 * DAY)).toEqual([]); // posted once
  });
});
