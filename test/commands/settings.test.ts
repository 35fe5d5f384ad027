/**
 * `/influence set` and `/influence settings`: every key's accepted values, every bad value refused
 * with the allowed range and nothing changed, stored settings read back with defaults filled in,
 * and the next digest time in the channel's time zone.
 */
import { describe, expect, it } from "vitest";
import {
  readChannelSettings,
  settingsFromStored,
  writeChannelSettings,
} from "../../src/commands/channel-settings-store.js";
import { nextDigestAt } from "../../src/commands/next-digest.js";
import {
  type ChannelSettings,
  DEFAULT_CHANNEL_SETTINGS,
} from "../../src/domain/channel-settings.js";
import { CHANNEL, runner } from "./channel-fixture.js";

describe("set: accepted values", () => {
  it.each<[string, Partial<ChannelSettings>]>([
    ["threshold 0.35", { threshold: 0.35 }],
    ["threshold 30%", { threshold: 0.3 }],
    ["threshold auto", { threshold: "auto" }],
    ["line 5%", { threshold: 0.05 }],
    ["threshold 0.95", { threshold: 0.95 }],
    ["window 7", { windowDays: 7 }],
    ["window 90 days", { windowDays: 90 }],
    ["halflife 0", { halfLifeDays: 0 }],
    ["halflife 1", { halfLifeDays: 1 }],
    ["halflife 60d", { halfLifeDays: 60 }],
    ["digest off", { digest: "off" }],
    ["digest monday 09:00", { digest: { weekday: 1, time: "09:00" } }],
    ["digest Fri 7:30", { digest: { weekday: 5, time: "07:30" } }],
    ["digest sundays 23:59", { digest: { weekday: 7, time: "23:59" } }],
    ["timezone Europe/Berlin", { timezone: "Europe/Berlin" }],
    ["timezone america/new_york", { timezone: "America/New_York" }],
    ["names on", { names: true }],
    ["names off", { names: false }],
    ["notes facilitators", { notes: "facilitators" }],
    ["notes off", { notes: "off" }],
    ["minmembers 3", { minMembers: 3 }],
    ["minmembers 50", { minMembers: 50 }],
    ["background auto", { background: "auto" }],
    ["background 0", { background: 0 }],
    ["background 2.5", { background: 2.5 }],
  ])("set %s", async (text, change) => {
    const r = await runner();
    const response = await r.run("UBOSS", `set ${text}`);
    const expected = { ...DEFAULT_CHANNEL_SETTINGS, ...change };
    // A value the channel already has changes nothing, and the answer says so.
    const same = JSON.stringify(expected) === JSON.stringify(DEFAULT_CHANNEL_SETTINGS);
    expect(response.message.text).toMatch(
      same ? / is already .*\. Nothing was changed\./ : /^Set /,
    );
    expect(await readChannelSettings(r.store, CHANNEL)).toEqual(expected);
  });

  it('a no-op says the value is already set, never "(was 40%)" for 40%', async () => {
    const r = await runner();
    expect((await r.run("UBOSS", "set threshold 40%")).message.text).toContain(
      "Set threshold to 40% (was auto)",
    );
    const again = (await r.run("UBOSS", "set threshold 0.4")).message.text.trim();
    expect(again).toBe("The setting threshold is already 40%. Nothing was changed.");
  });
});

describe("set: a missing value or a misspelt key gets that setting's usage", () => {
  it.each([
    ["window", '"set window" needs a value. /influence set window <value>: a whole number of days'],
    ["threshold", '"set threshold" needs a value. /influence set threshold <value>: auto, or a'],
    ["", '"set" needs a key and a value. /influence set <key> <value>:'],
    ["windw 21", "did you mean `window`? /influence set window <value>:"],
    ["treshold 30%", "did you mean `threshold`? /influence set threshold <value>:"],
    ["halflfie 7", "did you mean `halflife`?"],
    ["minmember 4", "did you mean `minmembers`?"],
  ])("set %j", async (text, said) => {
    const r = await runner();
    const response = (await r.run("UBOSS", `set ${text}`.trim())).message.text;
    expect(response).toContain(said);
    expect(response).not.toMatch(/cannot be nothing/i);
    expect(response).toContain("Nothing was changed");
    expect(await readChannelSettings(r.store, CHANNEL)).toEqual(DEFAULT_CHANNEL_SETTINGS);
  });
});

describe("set: bad values are refused with the allowed range, and nothing changes", () => {
  it.each([
    ["background -1", "from 0 to 1000"],
    ["background foo", "from 0 to 1000"],
    ["window 3", "from 7 to 90"],
    ["window 91", "from 7 to 90"],
    ["window 14.5", "from 7 to 90"],
    ["window", "from 7 to 90"],
    ["threshold 0.01", "from 0.05 to 0.95"],
    ["threshold 96%", "from 0.05 to 0.95"],
    ["threshold 30", "from 0.05 to 0.95"],
    ["threshold high", "from 0.05 to 0.95"],
    ["halflife 0.5", "0 (no decay) or a number of days from 1 to 60"],
    ["halflife 61", "0 (no decay) or a number of days from 1 to 60"],
    ["digest funday 09:00", "a weekday and a 24-hour time"],
    ["digest monday 24:00", "a weekday and a 24-hour time"],
    ["digest monday", "a weekday and a 24-hour time"],
    ["timezone Mars/Olympus_Mons", "IANA time zone"],
    ["timezone +01:00", "IANA time zone"],
    ["names maybe", "on or off"],
    ["notes everyone", "channel, facilitators or off"],
    ["minmembers 2", "from 3 to 50"],
    ["minmembers 51", "from 3 to 50"],
    ["minmembers 4.5", "from 3 to 50"],
    ["colour blue", "The keys are threshold, window"],
  ])("set %s", async (text, allowed) => {
    const r = await runner();
    await r.run("UBOSS", "set window 21");
    const response = await r.run("UBOSS", `set ${text}`);
    expect(response.visibility).toBe("private");
    expect(response.message.text).toContain(allowed);
    expect(response.message.text).toContain("Nothing was changed");
    expect(await readChannelSettings(r.store, CHANNEL)).toEqual({
      ...DEFAULT_CHANNEL_SETTINGS,
      windowDays: 21,
    });
  });
});

describe("settings storage", () => {
  it("settings shows every key with its value", async () => {
    const r = await runner();
    await r.run("UBOSS", "set digest thursday 14:00");
    const text = (await r.run("UBO", "settings")).message.text;
    for (const key of ["threshold", "window", "halflife", "digest", "timezone", "names", "notes"]) {
      expect(text).toContain(key);
    }
    expect(text).toContain("Thursdays at 14:00");
    expect(text).toContain("minmembers  5");
  });

  it("a damaged record keeps its valid fields and defaults the rest", async () => {
    const r = await runner();
    await r.store.writeChannelState(CHANNEL, "settings", {
      windowDays: 200,
      halfLifeDays: 0,
      threshold: "high",
      digest: { weekday: 9, time: "09:00" },
      timezone: "Nowhere/City",
      names: "yes",
      notes: "facilitators",
      minMembers: 7,
    });
    expect(await readChannelSettings(r.store, CHANNEL)).toEqual({
      ...DEFAULT_CHANNEL_SETTINGS,
      halfLifeDays: 0,
      notes: "facilitators",
      minMembers: 7,
    });
    expect(settingsFromStored(null)).toEqual(DEFAULT_CHANNEL_SETTINGS);
    expect(settingsFromStored("garbage")).toEqual(DEFAULT_CHANNEL_SETTINGS);
  });

  it("round-trips through the store", async () => {
    const r = await runner();
    const settings: ChannelSettings = {
      ...DEFAULT_CHANNEL_SETTINGS,
      threshold: 0.4,
      digest: { weekday: 3, time: "16:45" },
      timezone: "Asia/Tokyo",
    };
    await writeChannelSettings(r.store, CHANNEL, settings);
    expect(await readChannelSettings(r.store, CHANNEL)).toEqual(settings);
  });
});

describe("next digest", () => {
  // Central European Time is UTC+1 in winter and UTC+2 (CEST) in summer; summer time runs from the
  // last Sunday of March to the last Sunday of October (EU Directive 2000/84/EC, Art. 2–3).
  const berlin = (digest: ChannelSettings["digest"]): ChannelSettings => ({
    ...DEFAULT_CHANNEL_SETTINGS,
    digest,
    timezone: "Europe/Berlin",
  });

  it("Monday 09:00 in Berlin is 08:00 UTC in November and 07:00 UTC in July", () => {
    const sunday = Date.UTC(2026, 10, 22, 12, 0);
    expect(nextDigestAt(berlin({ weekday: 1, time: "09:00" }), sunday)).toBe(
      Date.UTC(2026, 10, 23, 8, 0),
    );
    const julyWednesday = Date.UTC(2026, 6, 1, 12, 0);
    expect(nextDigestAt(berlin({ weekday: 1, time: "09:00" }), julyWednesday)).toBe(
      Date.UTC(2026, 6, 6, 7, 0),
    );
  });

  it("the digest of the week when summer time ends keeps its local time", () => {
    // 2026-10-25 is the last Sunday of October: a Sunday 10:00 digest that day is at 09:00 UTC.
    const saturday = Date.UTC(2026, 9, 24, 12, 0);
    expect(nextDigestAt(berlin({ weekday: 7, time: "10:00" }), saturday)).toBe(
      Date.UTC(2026, 9, 25, 9, 0),
    );
  });

  it("is null when digests are off, and status says so", async () => {
    expect(nextDigestAt(berlin("off"), Date.UTC(2026, 10, 22))).toBeNull();
    const r = await runner();
    await r.run("UBOSS", "set digest off");
    expect((await r.run("UBO", "status")).message.text).toMatch(/Next digest\s+off/);
  });

  it("status gives the next digest in the channel's time zone", async () => {
    const r = await runner({ now: Date.UTC(2026, 10, 22, 12, 0) });
    await r.run("UBOSS", "set timezone Europe/Berlin");
    await r.run("UBOSS", "set digest monday 09:00");
    const text = (await r.run("UBO", "status")).message.text;
    expect(text).toMatch(/Next digest\s+Monday,? 23 November 2026, 09:00 \(Europe\/Berlin\)/);
  });
});
