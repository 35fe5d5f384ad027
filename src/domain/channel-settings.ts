/**
 * @module channel-settings
 * A channel's own settings (the `/influence set` keys) with their defaults and allowed ranges,
 * and how they become the model's `AnalysisSettings`.
 */
import { type AnalysisSettings, DEFAULT_SETTINGS } from "./settings.js";

/** ISO weekday: 1 = Monday … 7 = Sunday. */
export type Weekday = 1 | 2 | 3 | 4 | 5 | 6 | 7;

export interface DigestSchedule {
  readonly weekday: Weekday;
  /** "HH:MM", 24-hour, in the channel's time zone. */
  readonly time: string;
}

export type NotesDestination = "channel" | "facilitators" | "off";

export interface ChannelSettings {
  readonly threshold: number | "auto";
  readonly windowDays: number;
  readonly halfLifeDays: number;
  readonly digest: DigestSchedule | "off";
  /** IANA time zone name, e.g. "Europe/Berlin". */
  readonly timezone: string;
  /** Whether members who consented to be named may be named in this channel. */
  readonly names: boolean;
  readonly notes: NotesDestination;
  readonly minMembers: number;
  /** Prior strength (DESIGN.md §4.4): "auto" (learnt) or a number of signals ≥ 0. */
  readonly background: number | "auto";
}

export const DEFAULT_CHANNEL_SETTINGS: ChannelSettings = Object.freeze({
  threshold: "auto",
  windowDays: DEFAULT_SETTINGS.windowDays,
  halfLifeDays: DEFAULT_SETTINGS.halfLifeDays,
  digest: Object.freeze({ weekday: 1, time: "09:00" }) as DigestSchedule,
  timezone: "UTC",
  names: false,
  notes: "channel",
  minMembers: DEFAULT_SETTINGS.minMembers,
  background: DEFAULT_SETTINGS.background,
});

/** Allowed ranges of the `set` keys (issue: settings keys). */
export const SETTING_LIMITS = Object.freeze({
  threshold: { min: 0.05, max: 0.95 },
  windowDays: { min: 7, max: 90 },
  halfLifeDays: { min: 1, max: 60 },
  minMembers: { min: 3, max: 50 },
  background: { min: 0, max: 1000 },
});

export function analysisSettingsFor(
  channel: ChannelSettings,
  base: AnalysisSettings = DEFAULT_SETTINGS,
): AnalysisSettings {
  return {
    ...base,
    threshold: channel.threshold,
    windowDays: channel.windowDays,
    halfLifeDays: channel.halfLifeDays,
    minMembers: channel.minMembers,
    background: channel.background,
  };
}
