/**
 * @module describe-settings
 * The settings table for the docs: each environment variable with its default and meaning, in
 * the schema's order, then the few the CLI reads outside the schema. It is the one source of the
 * README's table (`renderSettingsTable`); tests keep it in step with the schema, with every
 * variable the code reads, and with the README.
 */
import {
  DEFAULT_DATABASE_URL,
  DEFAULT_HOST,
  DEFAULT_PG_CONNECT_TIMEOUT_MS,
  DEFAULT_PG_STATEMENT_TIMEOUT_MS,
  DEFAULT_PORT,
  DEFAULT_RETENTION_DAYS,
  type EnvKey,
  MIN_ID_KEY_LENGTH,
  RETENTION_DAYS_LIMITS,
} from "./env-schema.js";

/** Variables read outside the schema, by the CLI only. */
export const CLI_ONLY_SETTINGS = ["PLUMBLINE_DEBUG"] as const;
export type CliOnlySetting = (typeof CLI_ONLY_SETTINGS)[number];

export interface SettingRow {
  readonly setting: EnvKey | CliOnlySetting;
  /** The default as text; null when the setting has none (unset = feature off or generated). */
  readonly default: string | null;
  readonly meaning: string;
}

const ROWS: readonly SettingRow[] = [
  {
    setting: "DATABASE_URL",
    default: DEFAULT_DATABASE_URL,
    meaning: "Store: sqlite:<path>, sqlite::memory:, postgres://… (several replicas) or memory:",
  },
  {
    setting: "PLUMBLINE_ID_KEY",
    default: null,
    meaning: `Secret for the keyed HMAC of member ids (at least ${MIN_ID_KEY_LENGTH} characters); same on every replica. Unset with SQLite: generated into <database>.key`,
  },
  {
    setting: "PLUMBLINE_ID_KEY_FILE",
    default: null,
    meaning: "File holding the member id key, instead of PLUMBLINE_ID_KEY",
  },
  {
    setting: "PLUMBLINE_FACILITATORS",
    default: null,
    meaning: "Comma-separated platform ids who are facilitators in every channel",
  },
  {
    setting: "PLUMBLINE_RETENTION_DAYS",
    default: String(DEFAULT_RETENTION_DAYS),
    meaning: `Days the signal ledger is kept (${RETENTION_DAYS_LIMITS.min}–${RETENTION_DAYS_LIMITS.max})`,
  },
  { setting: "HOST", default: DEFAULT_HOST, meaning: "Address the HTTP server listens on" },
  { setting: "PORT", default: String(DEFAULT_PORT), meaning: "Port the HTTP server listens on" },
  {
    setting: "PLUMBLINE_PG_CONNECT_TIMEOUT_MS",
    default: String(DEFAULT_PG_CONNECT_TIMEOUT_MS),
    meaning:
      "PostgreSQL: ms to open a connection (TCP, TLS, start-up) before STORE_UNAVAILABLE (1–600000)",
  },
  {
    setting: "PLUMBLINE_PG_STATEMENT_TIMEOUT_MS",
    default: String(DEFAULT_PG_STATEMENT_TIMEOUT_MS),
    meaning: "PostgreSQL: ms each statement may run on the server (statement_timeout; 1–3600000)",
  },
  { setting: "LOG_LEVEL", default: "info", meaning: "debug, info, warn or error" },
  {
    setting: "PLUMBLINE_REPLICA_ID",
    default: "<hostname>-<pid>",
    meaning: "This replica's name in post claims (which replica posted a digest or note)",
  },
  {
    setting: "PLUMBLINE_REPORT_SECRET",
    default: null,
    meaning:
      "Signs the 24-hour report-page links (at least 16 characters; same on every replica). Unset: a random secret kept in the store, shared by its replicas",
  },
  {
    setting: "PLUMBLINE_PUBLIC_URL",
    default: null,
    meaning:
      "Public https address of the bot, for absolute report-page links; unset: relative links",
  },
  {
    setting: "SLACK_BOT_TOKEN",
    default: null,
    meaning: "Slack bot token (xoxb-…); with SLACK_SIGNING_SECRET turns Slack on",
  },
  {
    setting: "SLACK_SIGNING_SECRET",
    default: null,
    meaning: "Slack signing secret, to verify requests",
  },
  {
    setting: "SLACK_APP_TOKEN",
    default: null,
    meaning: "Slack app-level token (xapp-…): use Socket Mode instead of HTTP (development)",
  },
  {
    setting: "SLACK_API_URL",
    default: null,
    meaning: "Slack Web API base URL override (stubs, proxies); default Slack's own",
  },
  {
    setting: "MICROSOFT_APP_ID",
    default: null,
    meaning: "Teams bot app id; with its password and tenant turns Teams on",
  },
  {
    setting: "MICROSOFT_APP_PASSWORD",
    default: null,
    meaning: "Teams bot client secret (not used with UserAssignedMSI)",
  },
  {
    setting: "MICROSOFT_APP_TYPE",
    default: "SingleTenant",
    meaning: "SingleTenant, MultiTenant or UserAssignedMSI",
  },
  {
    setting: "MICROSOFT_APP_TENANT_ID",
    default: null,
    meaning: "Microsoft Entra tenant id (not used with MultiTenant)",
  },
  {
    setting: "PLUMBLINE_TEAMS_DEV_NO_AUTH",
    default: "0",
    meaning: "1: run Teams without app credentials, i.e. without authentication (development only)",
  },
  {
    setting: "PLUMBLINE_DEBUG",
    default: null,
    meaning: "CLI only: any value prints the stack of an internal error",
  },
];

/** Rows (setting, default, meaning) for the documentation's settings table. */
export function describeSettings(): readonly SettingRow[] {
  return FROZEN_ROWS;
}

const FROZEN_ROWS: readonly SettingRow[] = Object.freeze(ROWS.map((row) => Object.freeze(row)));

function cell(text: string): string {
  return text.replace(/\|/g, "\\|");
}

/** The README's settings table (Markdown), from `describeSettings()`. */
export function renderSettingsTable(): string {
  const lines = ["| setting | default | meaning |", "|---|---|---|"];
  for (const row of FROZEN_ROWS) {
    const value = row.default === null ? "—" : `\`${cell(row.default)}\``;
    lines.push(`| \`${row.setting}\` | ${value} | ${cell(row.meaning)} |`);
  }
  return `${lines.join("\n")}\n`;
}
