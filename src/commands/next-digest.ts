/**
 * @module next-digest
 * When a channel's next balance digest is due: its weekday and time as a cron pattern, evaluated
 * by croner in the channel's time zone (so a digest at 09:00 stays at 09:00 across daylight
 * saving changes).
 */
import { Cron } from "croner";
import type { ChannelSettings, DigestSchedule } from "../domain/channel-settings.js";

/** "MM HH * * D" with cron's weekdays (0 = Sunday … 6 = Saturday). */
export function digestCronPattern(schedule: DigestSchedule): string {
  const [hh, mm] = schedule.time.split(":").map(Number);
  return `${mm} ${hh} * * ${schedule.weekday % 7}`;
}

/** The next digest time after `now` (epoch ms), or null when digests are off. */
export function nextDigestAt(settings: ChannelSettings, now: number): number | null {
  if (settings.digest === "off") return null;
  const cron = new Cron(digestCronPattern(settings.digest), { timezone: settings.timezone });
  return cron.nextRun(new Date(now))?.getTime() ?? null;
}
