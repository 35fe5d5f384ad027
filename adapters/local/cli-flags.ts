/**
 * @module cli-flags
 * The analysis flags of DESIGN.md §6, parsed with node:util `parseArgs` and validated into
 * `AnalysisSettings` overrides. Every bad value is a `PlumblineError` naming the flag and its
 * allowed range; nothing is guessed.
 */
import { parseArgs } from "node:util";
import { PlumblineError } from "../../src/domain/errors.js";
import { type AnalysisSettings, DAY_MS, DEFAULT_SETTINGS } from "../../src/domain/settings.js";

type OptionSpec = { type: "string" | "boolean"; multiple?: boolean; short?: string };

/** The model flags every analysing command takes. */
export const ANALYSIS_OPTIONS = {
  channel: { type: "string" },
  until: { type: "string" },
  window: { type: "string" },
  "half-life": { type: "string" },
  "reply-weight": { type: "string" },
  "mention-weight": { type: "string" },
  background: { type: "string" },
  "self-weight": { type: "string" },
  samples: { type: "string" },
  interval: { type: "string" },
  seed: { type: "string" },
  threshold: { type: "string" },
  "min-members": { type: "string" },
  "min-signals": { type: "string" },
  "skip-bad": { type: "boolean" },
  json: { type: "boolean" },
  db: { type: "string" },
} as const satisfies Record<string, OptionSpec>;

export interface ParsedCommand {
  readonly values: Record<string, string | boolean | string[] | undefined>;
  readonly positionals: string[];
}

/** Parses argv strictly; unknown flags and missing values become ARG_* errors with the fix. */
export function parseCommandArgs(
  argv: readonly string[],
  options: Record<string, OptionSpec>,
  usage: string,
): ParsedCommand {
  try {
    const { values, positionals } = parseArgs({
      args: [...argv],
      options,
      allowPositionals: true,
      strict: true,
    });
    return { values: values as ParsedCommand["values"], positionals };
  } catch (error) {
    const message = error instanceof Error ? error.message : String(error);
    const unknown = /Unknown option '([^']+)'/.exec(message);
    if (unknown) {
      throw new PlumblineError("ARG_UNKNOWN", `unknown flag ${unknown[1]}`, {
        hint: `usage: ${usage}`,
      });
    }
    const missing = /Option '([^']+?)(?: <value>)?' argument missing/.exec(message);
    if (missing) {
      throw new PlumblineError("ARG_MISSING", `flag ${missing[1]} needs a value`, {
        hint: `usage: ${usage}`,
      });
    }
    throw new PlumblineError("ARG_BAD_VALUE", message.split("\n")[0], { hint: `usage: ${usage}` });
  }
}

function numberFlag(
  raw: string,
  flag: string,
  limits: {
    min: number;
    max: number;
    integer?: boolean;
    minExclusive?: boolean;
    maxExclusive?: boolean;
  },
  alternative?: string,
): number {
  const value = Number(raw);
  const lowOk = limits.minExclusive ? value > limits.min : value >= limits.min;
  const highOk = limits.maxExclusive ? value < limits.max : value <= limits.max;
  const intOk = !limits.integer || Number.isInteger(value);
  if (raw.trim() === "" || !Number.isFinite(value) || !lowOk || !highOk || !intOk) {
    const open = limits.minExclusive ? "above" : "from";
    const close = limits.maxExclusive ? "below" : "to";
    throw new PlumblineError("ARG_BAD_VALUE", `--${flag} ${JSON.stringify(raw)} is not allowed`, {
      hint: `give ${limits.integer ? "a whole number" : "a number"} ${open} ${limits.min} ${close} ${limits.max}${alternative ? `, ${alternative}` : ""}`,
    });
  }
  return value;
}

/** `--until`: an ISO 8601 time with a zone, or a date (meaning the end of that UTC day). */
export function parseUntil(raw: string): number {
  if (/^\d{4}-\d{2}-\d{2}$/.test(raw)) {
    const ms = Date.parse(`${raw}T00:00:00Z`);
    if (Number.isFinite(ms) && new Date(ms).toISOString().slice(0, 10) === raw)
      return ms + DAY_MS - 1;
  } else if (
    /^\d{4}-\d{2}-\d{2}T[\d:.]+(Z|[+-]\d{2}:\d{2})$/.test(raw) &&
    Number.isFinite(Date.parse(raw))
  ) {
    return Date.parse(raw);
  }
  throw new PlumblineError("ARG_BAD_VALUE", `--until ${JSON.stringify(raw)} is not a time`, {
    hint: "give an ISO 8601 time with a zone (2026-11-29T18:00:00Z) or a date (2026-11-29)",
  });
}

/** Settings from the flags, on top of `base` (the defaults, or a channel's stored settings). */
export function settingsFromFlags(
  values: ParsedCommand["values"],
  base: AnalysisSettings = DEFAULT_SETTINGS,
): AnalysisSettings {
  const get = (flag: string): string | undefined => {
    const v = values[flag];
    return typeof v === "string" ? v : undefined;
  };
  const num = (
    flag: string,
    limits: Parameters<typeof numberFlag>[2],
    fallback: number,
  ): number => {
    const raw = get(flag);
    return raw === undefined ? fallback : numberFlag(raw, flag, limits);
  };
  const thresholdRaw = get("threshold");
  const threshold =
    thresholdRaw === undefined
      ? base.threshold
      : thresholdRaw === "auto"
        ? "auto"
        : numberFlag(thresholdRaw, "threshold", { min: 0.05, max: 0.95 });
  const backgroundRaw = get("background");
  const background =
    backgroundRaw === undefined
      ? base.background
      : backgroundRaw === "auto"
        ? "auto"
        : numberFlag(backgroundRaw, "background", { min: 0, max: 1000 }, "or auto (default)");
  const seedRaw = get("seed");
  const settings: AnalysisSettings = {
    ...base,
    windowDays: num("window", { min: 1, max: 365, integer: true }, base.windowDays),
    halfLifeDays: num("half-life", { min: 0, max: 365 }, base.halfLifeDays),
    replyWeight: num("reply-weight", { min: 0, max: 100 }, base.replyWeight),
    mentionWeight: num("mention-weight", { min: 0, max: 100 }, base.mentionWeight),
    background,
    selfWeight: num("self-weight", { min: 0, max: 1, maxExclusive: true }, base.selfWeight),
    samples: num("samples", { min: 0, max: 20000, integer: true }, base.samples),
    interval: num(
      "interval",
      { min: 0, max: 1, minExclusive: true, maxExclusive: true },
      base.interval,
    ),
    seed:
      seedRaw === undefined
        ? base.seed
        : numberFlag(seedRaw, "seed", { min: 0, max: 4294967295, integer: true }),
    threshold,
    minMembers: num("min-members", { min: 3, max: 1000, integer: true }, base.minMembers),
    minSignals: num("min-signals", { min: 0, max: 1e9, integer: true }, base.minSignals),
  };
  if (settings.replyWeight === 0 && settings.mentionWeight === 0) {
    throw new PlumblineError(
      "ARG_BAD_VALUE",
      "--reply-weight and --mention-weight are both 0, so nothing would count",
      {
        hint: "give at least one of them a weight above 0",
      },
    );
  }
  return settings;
}
