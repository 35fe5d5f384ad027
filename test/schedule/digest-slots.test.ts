import { describe, expect, it } from "vitest";
import { digestCronPattern, digestSlotsBetween } from "../../src/schedule/digest-slots.js";
import { digestPeriod, notePeriod } from "../../src/schedule/slot-period.js";

const iso = (ms: number) => new Date(ms).toISOString();

describe("digest slots", () => {
  it("keep Monday 09:00 in Europe/Berlin across the end of summer time", () => {
    // Directive 2000/84/EC, Art. 2-3: summer time ends on the last Sunday of October at
    // 01:00 GMT (2026-10-25). Berlin is UTC+2 in summer time and UTC+1 after it, so 09:00 local
    // is 07:00Z on 19 October and 08:00Z on 26 October.
    const slots = digestSlotsBetween({
      schedule: { weekday: 1, time: "09:00" },
      timezone: "Europe/Berlin",
      from: Date.UTC(2026, 9, 10),
      to: Date.UTC(2026, 10, 3),
    });
    expect(slots.map(iso)).toEqual([
      "2026-10-12T07:00:00.000Z",
      "2026-10-19T07:00:00.000Z",
      "2026-10-26T08:00:00.000Z",
      "2026-11-02T08:00:00.000Z",
    ]);
    expect(slots.map((s) => digestPeriod(s, "Europe/Berlin"))).toEqual([
      "2026-10-12T09:00[Europe/Berlin]",
      "2026-10-19T09:00[Europe/Berlin]",
      "2026-10-26T09:00[Europe/Berlin]",
      "2026-11-02T09:00[Europe/Berlin]",
    ]);
  });

  it("keep 09:00 in America/New_York when daylight saving time ends on 1 November 2026", () => {
    // Energy Policy Act of 2005 §110 (15 U.S.C. 260a): DST ends on the first Sunday of November;
    // New York is UTC-4 before and UTC-5 after.
    const slots = digestSlotsBetween({
      schedule: { weekday: 1, time: "09:00" },
      timezone: "America/New_York",
      from: Date.UTC(2026, 9, 25),
      to: Date.UTC(2026, 10, 3),
    });
    expect(slots.map(iso)).toEqual(["2026-10-26T13:00:00.000Z", "2026-11-02T14:00:00.000Z"]);
  });

  it("map ISO weekdays to cron weekdays (Sunday is 0 in cron)", () => {
    expect(digestCronPattern({ weekday: 7, time: "18:05" })).toBe("5 18 * * 0");
    expect(digestCronPattern({ weekday: 1, time: "09:00" })).toBe("0 9 * * 1");
    expect(() => digestCronPattern({ weekday: 1, time: "9:00" })).toThrow(
      expect.objectContaining({ code: "SETTING_BAD_VALUE" }),
    );
    expect(() =>
      digestSlotsBetween({
        schedule: { weekday: 1, time: "09:00" },
        timezone: "Mars/Olympus",
        from: 0,
        to: 1,
      }),
    ).toThrow(expect.objectContaining({ code: "SETTING_BAD_VALUE" }));
  });

  it("name note slots by the UTC hour", () => {
    expect(notePeriod(Date.UTC(2026, 9, 25, 1, 59, 59))).toBe("2026-10-25T01:00Z");
    expect(notePeriod(Date.UTC(2026, 9, 25, 2, 0, 0))).toBe("2026-10-25T02:00Z");
  });
});
