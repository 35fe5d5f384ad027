/**
 * @module env-schema
 * The one zod schema of plumbline's environment settings. Blank values count as unset; numbers
 * get their defaults here, the rest in `loadConfig`, so the schema can tell a given value from an
 * absent one. Each problem is reported against the variable to fix, and the Slack and Teams groups
 * are checked as
 * sets (a partial set names each missing variable) even when other fields already failed, so one
 * run lists every problem. Messages never echo a secret's value.
 */
import { z } from "zod";

export const DEFAULT_DATABASE_URL = "sqlite:./data/plumbline.db";
export const DEFAULT_RETENTION_DAYS = 91;
export const RETENTION_DAYS_LIMITS = { min: 7, max: 400 } as const;
export const DEFAULT_HOST = "0.0.0.0";
export const DEFAULT_PORT = 3000;
export const MIN_ID_KEY_LENGTH = 32;
export const DEFAULT_PG_CONNECT_TIMEOUT_MS = 5000;
export const DEFAULT_PG_STATEMENT_TIMEOUT_MS = 30_000;
export const LOG_LEVELS = ["debug", "info", "warn", "error"] as const;
export const TEAMS_APP_TYPES = ["SingleTenant", "MultiTenant", "UserAssignedMSI"] as const;

export type LogLevel = (typeof LOG_LEVELS)[number];
export type TeamsAppType = (typeof TEAMS_APP_TYPES)[number];

function blankToUndefined(value: unknown): unknown {
  if (typeof value !== "string") return value;
  const trimmed = value.trim();
  return trimmed === "" ? undefined : trimmed;
}

const text = () => z.preprocess(blankToUndefined, z.string().optional());

function matching(pattern: RegExp, message: string) {
  return z.preprocess(blankToUndefined, z.string().regex(pattern, { error: message }).optional());
}

function wholeNumber(min: number, max: number, fallback: number) {
  return text().transform((value, ctx): number => {
    if (value === undefined) return fallback;
    const n = /^\d+$/.test(value) ? Number(value) : Number.NaN;
    if (!(n >= min && n <= max)) {
      ctx.addIssue({
        code: "custom",
        message: `must be a whole number from ${min} to ${max} (got ${JSON.stringify(value)})`,
      });
      return z.NEVER;
    }
    return n;
  });
}

function oneOf<const T extends readonly [string, ...string[]]>(values: T) {
  return text().transform((value, ctx): T[number] | undefined => {
    if (value === undefined) return undefined;
    const found = values.find((v) => v === value);
    if (found === undefined) {
      ctx.addIssue({
        code: "custom",
        message: `must be one of ${values.join(", ")} (got ${JSON.stringify(value)})`,
      });
      return z.NEVER;
    }
    return found;
  });
}

const facilitatorList = text().transform((value, ctx): string[] => {
  if (value === undefined) return [];
  const ids = value
    .split(",")
    .map((id) => id.trim())
    .filter((id) => id !== "");
  const bad = ids.filter((id) => /\s/.test(id));
  if (bad.length > 0) {
    ctx.addIssue({
      code: "custom",
      message: `must list platform ids separated by commas, without spaces inside an id (${bad.map((id) => JSON.stringify(id)).join(", ")})`,
    });
    return z.NEVER;
  }
  return [...new Set(ids)];
});

const httpUrl = text().refine(
  (value) => {
    if (value === undefined) return true;
    try {
      const url = new URL(value);
      return url.protocol === "https:" || url.protocol === "http:";
    } catch {
      return false;
    }
  },
  { error: "must be an http(s) URL, e.g. https://slack.com/api/" },
);

const SLACK_KEYS = ["SLACK_BOT_TOKEN", "SLACK_SIGNING_SECRET", "SLACK_APP_TOKEN", "SLACK_API_URL"];
const TEAMS_KEYS = [
  "MICROSOFT_APP_ID",
  "MICROSOFT_APP_PASSWORD",
  "MICROSOFT_APP_TYPE",
  "MICROSOFT_APP_TENANT_ID",
];

/** The fields of the environment schema, one per setting. */
export const ENV_FIELDS = {
  DATABASE_URL: matching(
    /^(memory:|sqlite:\S+|postgres(ql)?:\/\/[^/\s]\S*)$/,
    "must be sqlite:<path> (e.g. sqlite:./data/plumbline.db), sqlite::memory:, postgres://user@host:5432/db or memory:",
  ),
  PLUMBLINE_ID_KEY: text().refine((v) => v === undefined || v.length >= MIN_ID_KEY_LENGTH, {
    error: `must be at least ${MIN_ID_KEY_LENGTH} characters; generate one with \`openssl rand -hex 32\``,
  }),
  PLUMBLINE_ID_KEY_FILE: text(),
  PLUMBLINE_FACILITATORS: facilitatorList,
  PLUMBLINE_RETENTION_DAYS: wholeNumber(
    RETENTION_DAYS_LIMITS.min,
    RETENTION_DAYS_LIMITS.max,
    DEFAULT_RETENTION_DAYS,
  ),
  HOST: text(),
  PORT: wholeNumber(0, 65535, DEFAULT_PORT), // 0: any free port (tests),
  PLUMBLINE_PG_CONNECT_TIMEOUT_MS: wholeNumber(1, 600_000, DEFAULT_PG_CONNECT_TIMEOUT_MS),
  PLUMBLINE_PG_STATEMENT_TIMEOUT_MS: wholeNumber(1, 3_600_000, DEFAULT_PG_STATEMENT_TIMEOUT_MS),
  LOG_LEVEL: oneOf(LOG_LEVELS),
  PLUMBLINE_REPLICA_ID: matching(/^\S+$/, "must not contain spaces"),
  PLUMBLINE_REPORT_SECRET: text().refine((v) => v === undefined || v.length >= 16, {
    error: "must be at least 16 characters; generate one with `openssl rand -hex 32`",
  }),
  PLUMBLINE_PUBLIC_URL: httpUrl,
  SLACK_BOT_TOKEN: matching(/^xoxb-\S+$/, "must be a bot token starting with xoxb-"),
  SLACK_SIGNING_SECRET: text(),
  SLACK_APP_TOKEN: matching(/^xapp-\S+$/, "must be an app-level token starting with xapp-"),
  SLACK_API_URL: httpUrl,
  MICROSOFT_APP_ID: text(),
  MICROSOFT_APP_PASSWORD: text(),
  MICROSOFT_APP_TYPE: oneOf(TEAMS_APP_TYPES),
  MICROSOFT_APP_TENANT_ID: text(),
  PLUMBLINE_TEAMS_DEV_NO_AUTH: oneOf(["0", "1"]),
} as const;

export type EnvKey = keyof typeof ENV_FIELDS;

type IssueSink = { addIssue(issue: { code: "custom"; path: string[]; message: string }): void };

/**
 * The Slack and Teams set rules. None of these fields has a schema default, so a key is given
 * exactly when its parsed value is defined (a value that failed its own format check stays).
 */
function checkSets(env: Readonly<Record<string, unknown>>, ctx: IssueSink): void {
  const given = (key: string) => env[key] !== undefined;
  const missing = (key: string, message: string) =>
    ctx.addIssue({ code: "custom", path: [key], message });
  if (SLACK_KEYS.some(given)) {
    for (const key of ["SLACK_BOT_TOKEN", "SLACK_SIGNING_SECRET"].filter((k) => !given(k))) {
      missing(
        key,
        "is missing: Slack needs SLACK_BOT_TOKEN and SLACK_SIGNING_SECRET together (other SLACK_* settings are set); set it, or unset every SLACK_* setting",
      );
    }
  }
  if (TEAMS_KEYS.some(given)) {
    const type =
      typeof env.MICROSOFT_APP_TYPE === "string" ? env.MICROSOFT_APP_TYPE : "SingleTenant";
    const needed = ["MICROSOFT_APP_ID"];
    if (type !== "UserAssignedMSI") needed.push("MICROSOFT_APP_PASSWORD");
    if (type !== "MultiTenant") needed.push("MICROSOFT_APP_TENANT_ID");
    for (const key of needed.filter((k) => !given(k))) {
      missing(
        key,
        `is missing: Teams (MICROSOFT_APP_TYPE ${type}) needs ${needed.join(", ")}; set it, or unset every MICROSOFT_* setting`,
      );
    }
  }
}

/** The environment schema: one check per field, then the Slack and Teams set rules (always run). */
export const envSchema = z
  .object(ENV_FIELDS)
  .superRefine((env, ctx) => checkSets(env, ctx), { when: () => true });

export type ParsedEnv = z.output<typeof envSchema>;
