/**
 * @module digest-slots
 * The instants of a channel's weekly digest: its weekday and "HH:MM" in its own time zone, turned
 * into a cron pattern and enumerated by croner, which keeps the wall-clock time across daylight
 * saving changes (09:00 local stays 09:00 local; the UTC instant moves by the offset change).
 */
import { Cron } from "croner";
import type { DigestSchedule } from "../domain/channel-settings.js";
import { PlumblineError } from "../domain/errors.js";
import { assertTimeZone } from "./slot-period.js";

/** The 5-field cron pattern of a digest schedule (cron weekdays: 0 = Sunday … 6 = Saturday). */
export function digestCronPattern(schedule: DigestSchedule): string {
  const match = /^([01]\d|2[0-3]):([0-5]\d)$/.exec(schedule.time);
  if (
    match === null ||
    !Number.isInteger(schedule.weekday) ||
    schedule.weekday < 1 ||
    schedule.weekday > 7
  ) {
    throw new PlumblineError(
      "SETTING_BAD_VALUE",
      `digest schedule ${JSON.stringify(schedule)} is not a weekday 1-7 and a time HH:MM`,
      { hint: "set digest to a weekday and a 24-hour time, e.g. `set digest mon 09:00`, or `off`" },
    );
  }
  return `${Number(match[2])} ${Number(match[1])} * * ${schedule.weekday % 7}`;
}

const crons = new Map<string, Cron>();

function cronFor(pattern: string, timezone: string): Cron {
  const id = `${pattern} ${timezone}`;
  let cron = crons.get(id);
  if (cron === undefined) {
    assertTimeZone(timezone);
    cron = new Cron(pattern, { timezone, paused: true });
    // Patterns are weekday × minute and zones a few hundred: the cache stays small.
    crons.set(id, cron);
  }
  return cron;
}

/** Digest slot instants (epoch ms) in (from, to], oldest first. */
export function digestSlotsBetween(args: {
  readonly schedule: DigestSchedule;
  readonly timezone: string;
  readonly from: number;
  readonly to: number;
}): number[] {
  const cron = cronFor(digestCronPattern(args.schedule), args.timezone);
  const slots: number[] = [];
  let cursor = new Date(args.from);
  for (;;) {
    const next = cron.nextRun(cursor);
    if (next === null || next.getTime() > args.to) break;
    slots.push(next.getTime());
    cursor = next;
  }
  return slots;
}
