/**
 * @module parse-setting
 * `/influence set <key> <value>`: each key's accepted values and ranges (SETTING_LIMITS). A bad
 * value throws SETTING_BAD_VALUE with a message that gives the allowed values, so nothing is
 * changed and the facilitator knows what to type instead.
 */
import {
  type ChannelSettings,
  type DigestSchedule,
  SETTING_LIMITS,
  type Weekday,
} from "../domain/channel-settings.js";
import { PlumblineError } from "../domain/errors.js";
import { isKnownTimeZone } from "./channel-settings-store.js";
import { parseShare } from "./parse-input.js";

export type SettingKey =
  | "threshold"
  | "window"
  | "halflife"
  | "digest"
  | "timezone"
  | "names"
  | "notes"
  | "minmembers"
  | "background";

export const SETTING_KEYS: readonly SettingKey[] = [
  "threshold",
  "window",
  "halflife",
  "digest",
  "timezone",
  "names",
  "notes",
  "minmembers",
  "background",
];

const ALIASES: Record<string, SettingKey> = {
  line: "threshold",
  "half-life": "halflife",
  "min-members": "minmembers",
  tz: "timezone",
};

/** The setting key a word names, or null. */
export function settingKey(word: string): SettingKey | null {
  const w = word.toLowerCase();
  return SETTING_KEYS.find((k) => k === w) ?? ALIASES[w] ?? null;
}

/** What each key accepts, as said to the user. */
export const ALLOWED: Record<SettingKey, string> = {
  threshold:
    "auto, or a share from 0.05 to 0.95 (5% to 95%), e.g. set threshold 0.35 or set threshold 35%",
  window: "a whole number of days from 7 to 90, e.g. set window 28",
  halflife: "0 (no decay) or a number of days from 1 to 60, e.g. set halflife 14",
  digest: "off, or a weekday and a 24-hour time, e.g. set digest monday 09:00",
  timezone: "an IANA time zone name, e.g. set timezone Europe/Berlin or set timezone UTC",
  names: "on or off",
  notes: "channel, facilitators or off",
  minmembers: "a whole number from 3 to 50, e.g. set minmembers 5",
  background:
    "auto (learnt from the replies), or a prior strength in signals from 0 to 1000, e.g. set background 2",
};

function bad(key: SettingKey, given: string): PlumblineError {
  const shown = given === "" ? "nothing" : `"${given}"`;
  return new PlumblineError(
    "SETTING_BAD_VALUE",
    `${key} cannot be ${shown}. It takes ${ALLOWED[key]}. Nothing was changed.`,
    { hint: `give ${key} ${ALLOWED[key]}` },
  );
}

function days(value: string): number | null {
  const m = /^(\d+(?:\.\d+)?)(?:d|days?)?$/.exec(value.toLowerCase());
  return m ? Number(m[1]) : null;
}

const WEEKDAY_NAMES = [
  "monday",
  "tuesday",
  "wednesday",
  "thursday",
  "friday",
  "saturday",
  "sunday",
];

function weekday(word: string): Weekday | null {
  const w = word.toLowerCase().replace(/s$/, "");
  if (w.length < 3) return null;
  const k = WEEKDAY_NAMES.findIndex((name) => name.startsWith(w));
  return k < 0 ? null : ((k + 1) as Weekday);
}

function clock(word: string): string | null {
  const m = /^(\d{1,2}):(\d{2})$/.exec(word);
  if (!m) return null;
  const h = Number(m[1]);
  const min = Number(m[2]);
  if (h > 23 || min > 59) return null;
  return `${String(h).padStart(2, "0")}:${m[2]}`;
}

function onOff(value: string): boolean | null {
  const v = value.toLowerCase();
  if (["on", "yes", "true"].includes(v)) return true;
  if (["off", "no", "false"].includes(v)) return false;
  return null;
}

/** The change `set <key> <value words>` makes; throws SETTING_BAD_VALUE for a bad value. */
export function parseSetting(
  key: SettingKey,
  valueWords: readonly string[],
): Partial<ChannelSettings> {
  const value = valueWords.join(" ");
  const lower = value.toLowerCase();
  switch (key) {
    case "threshold": {
      if (lower === "auto") return { threshold: "auto" };
      const share = valueWords.length === 1 ? parseShare(value) : null;
      const { min, max } = SETTING_LIMITS.threshold;
      if (share === null || share < min || share > max) throw bad(key, value);
      return { threshold: share };
    }
    case "window": {
      const n = days(lower.replace(/\s+/g, ""));
      const { min, max } = SETTING_LIMITS.windowDays;
      if (n === null || !Number.isInteger(n) || n < min || n > max) throw bad(key, value);
      return { windowDays: n };
    }
    case "halflife": {
      const n = days(lower.replace(/\s+/g, ""));
      const { min, max } = SETTING_LIMITS.halfLifeDays;
      if (n === null || (n !== 0 && (n < min || n > max))) throw bad(key, value);
      return { halfLifeDays: n };
    }
    case "digest": {
      if (lower === "off") return { digest: "off" };
      const day = valueWords.length === 2 ? weekday(valueWords[0]) : null;
      const time = valueWords.length === 2 ? clock(valueWords[1]) : null;
      if (day === null || time === null) throw bad(key, value);
      const digest: DigestSchedule = { weekday: day, time };
      return { digest };
    }
    case "timezone": {
      if (valueWords.length !== 1 || !isKnownTimeZone(value)) throw bad(key, value);
      return {
        timezone: new Intl.DateTimeFormat("en", { timeZone: value }).resolvedOptions().timeZone,
      };
    }
    case "names": {
      const on = valueWords.length === 1 ? onOff(value) : null;
      if (on === null) throw bad(key, value);
      return { names: on };
    }
    case "notes": {
      if (lower === "channel" || lower === "facilitators" || lower === "off")
        return { notes: lower };
      throw bad(key, value);
    }
    case "minmembers": {
      const n = valueWords.length === 1 ? Number(value) : Number.NaN;
      const { min, max } = SETTING_LIMITS.minMembers;
      if (value === "" || !Number.isInteger(n) || n < min || n > max) throw bad(key, value);
      return { minMembers: n };
    }
    case "background": {
      if (lower === "auto") return { background: "auto" };
      const n = valueWords.length === 1 && value.trim() !== "" ? Number(value) : Number.NaN;
      const { min, max } = SETTING_LIMITS.background;
      if (!Number.isFinite(n) || n < min || n > max) throw bad(key, value);
      return { background: n };
    }
  }
}
