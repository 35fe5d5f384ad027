/**
 * @module channel-settings-store
 * A channel's settings as kept in the store's `settings` channel state, read back with the
 * defaults of DESIGN.md §4 filled in wherever a field is missing or no longer valid, so an old or
 * damaged record never breaks a command, a digest or a note.
 */
import {
  type ChannelSettings,
  DEFAULT_CHANNEL_SETTINGS,
  type DigestSchedule,
  type NotesDestination,
  SETTING_LIMITS,
  type Weekday,
} from "../domain/channel-settings.js";
import type { Store } from "../ports/store.js";

function inRange(x: unknown, limits: { min: number; max: number }): x is number {
  return typeof x === "number" && Number.isFinite(x) && x >= limits.min && x <= limits.max;
}

/** True when the name is a time zone this runtime knows (IANA names, e.g. "Europe/Berlin"). */
export function isKnownTimeZone(name: string): boolean {
  if (!/^[A-Za-z][A-Za-z0-9_+\-/]*$/.test(name)) return false;
  try {
    new Intl.DateTimeFormat("en", { timeZone: name });
    return true;
  } catch {
    return false;
  }
}

function digestOf(value: unknown): DigestSchedule | "off" | null {
  if (value === "off") return "off";
  if (typeof value !== "object" || value === null) return null;
  const { weekday, time } = value as { weekday?: unknown; time?: unknown };
  if (typeof weekday !== "number" || !Number.isInteger(weekday) || weekday < 1 || weekday > 7) {
    return null;
  }
  if (typeof time !== "string" || !/^([01]\d|2[0-3]):[0-5]\d$/.test(time)) return null;
  return { weekday: weekday as Weekday, time };
}

/** A settings object from stored JSON: every valid field kept, every other one defaulted. */
export function settingsFromStored(value: unknown): ChannelSettings {
  const d = DEFAULT_CHANNEL_SETTINGS;
  if (typeof value !== "object" || value === null) return d;
  const v = value as Record<string, unknown>;
  const notes: NotesDestination[] = ["channel", "facilitators", "off"];
  const halfLife = v.halfLifeDays;
  return {
    threshold:
      v.threshold === "auto" || inRange(v.threshold, SETTING_LIMITS.threshold)
        ? (v.threshold as number | "auto")
        : d.threshold,
    windowDays:
      inRange(v.windowDays, SETTING_LIMITS.windowDays) && Number.isInteger(v.windowDays)
        ? v.windowDays
        : d.windowDays,
    halfLifeDays:
      halfLife === 0 || inRange(halfLife, SETTING_LIMITS.halfLifeDays)
        ? (halfLife as number)
        : d.halfLifeDays,
    digest: digestOf(v.digest) ?? d.digest,
    timezone:
      typeof v.timezone === "string" && isKnownTimeZone(v.timezone) ? v.timezone : d.timezone,
    names: typeof v.names === "boolean" ? v.names : d.names,
    notes: notes.find((n) => n === v.notes) ?? d.notes,
    minMembers:
      inRange(v.minMembers, SETTING_LIMITS.minMembers) && Number.isInteger(v.minMembers)
        ? v.minMembers
        : d.minMembers,
    background:
      v.background === "auto" || inRange(v.background, SETTING_LIMITS.background)
        ? (v.background as number | "auto")
        : d.background,
  };
}

/** The channel's settings, defaults filled in. */
export async function readChannelSettings(store: Store, channel: string): Promise<ChannelSettings> {
  return settingsFromStored(await store.readChannelState(channel, "settings"));
}

/** Stores the channel's settings (the whole object). */
export async function writeChannelSettings(
  store: Store,
  channel: string,
  settings: ChannelSettings,
): Promise<void> {
  await store.writeChannelState(channel, "settings", { ...settings });
}
