/**
 * @module load-config
 * `loadConfig(env)`: parses the environment once with the settings schema and returns a frozen,
 * typed `Config`, or throws CONFIG_INVALID listing every problem with the variable to fix (the
 * environment is a parameter, as in probot's `read-env-options`). Slack and Teams sections exist
 * only when their credentials are complete.
 */
import { hostname } from "node:os";
import { PlumblineError } from "../domain/errors.js";
import {
  DEFAULT_DATABASE_URL,
  DEFAULT_HOST,
  envSchema,
  type LogLevel,
  type ParsedEnv,
  type TeamsAppType,
} from "./env-schema.js";

export interface SlackConfig {
  readonly botToken: string;
  readonly signingSecret: string;
  /** Present: Socket Mode (development). */
  readonly appToken: string | null;
  /** Web API base URL override (tests, proxies). */
  readonly apiUrl: string | null;
}

export interface TeamsConfig {
  readonly appId: string;
  /** Null only for UserAssignedMSI. */
  readonly appPassword: string | null;
  readonly appType: TeamsAppType;
  /** Null only for MultiTenant. */
  readonly tenantId: string | null;
}

export interface Config {
  readonly databaseUrl: string;
  /** PLUMBLINE_ID_KEY; null: the store reads `idKeyFile` or its own key file. */
  readonly idKey: string | null;
  readonly idKeyFile: string | null;
  /** PostgreSQL connect and statement timeouts, ms (defaults 5000 and 30000). */
  readonly pgConnectTimeoutMs: number;
  readonly pgStatementTimeoutMs: number;
  /** Platform ids who are facilitators of every channel. */
  readonly facilitators: readonly string[];
  readonly retentionDays: number;
  readonly host: string;
  readonly port: number;
  readonly logLevel: LogLevel;
  /** This process's name in post claims. */
  readonly replicaId: string;
  /** Signs report-page links; null: a random secret per process (links end with a restart). */
  readonly reportSecret: string | null;
  /** Public base URL of the bot, for absolute report links; null: links are relative. */
  readonly publicUrl: string | null;
  /** Null unless SLACK_BOT_TOKEN and SLACK_SIGNING_SECRET are both given. */
  readonly slack: SlackConfig | null;
  /** Null unless the Teams app credentials are complete for MICROSOFT_APP_TYPE. */
  readonly teams: TeamsConfig | null;
  /** PLUMBLINE_TEAMS_DEV_NO_AUTH=1: run Teams without credentials (development only). */
  readonly teamsDevNoAuth: boolean;
}

export interface ConfigProblem {
  /** The environment variable to fix. */
  readonly setting: string;
  readonly message: string;
}

/** CONFIG_INVALID with every problem found, each naming its setting. */
export class ConfigError extends PlumblineError {
  readonly problems: readonly ConfigProblem[];

  constructor(problems: readonly ConfigProblem[]) {
    const lines = problems.map((p) => `  - ${p.setting} ${p.message}`);
    super(
      "CONFIG_INVALID",
      `invalid configuration (${problems.length} problem${problems.length === 1 ? "" : "s"}):\n${lines.join("\n")}`,
      { hint: `fix ${[...new Set(problems.map((p) => p.setting))].join(", ")} and start again` },
    );
    this.name = "ConfigError";
    this.problems = Object.freeze(problems.map((p) => Object.freeze({ ...p })));
  }
}

export interface LoadConfigOptions {
  /** For the default replica id; default os.hostname(). */
  readonly hostname?: string;
  /** For the default replica id; default process.pid. */
  readonly pid?: number;
}

/** Parses `env` (e.g. process.env) into a frozen Config, or throws ConfigError (CONFIG_INVALID). */
export function loadConfig(
  env: Readonly<Record<string, string | undefined>>,
  options: LoadConfigOptions = {},
): Config {
  const result = envSchema.safeParse(env);
  if (!result.success) {
    throw new ConfigError(
      result.error.issues.map((issue) => ({
        setting: issue.path.length > 0 ? String(issue.path[0]) : "environment",
        message: issue.message,
      })),
    );
  }
  const e = result.data;
  const config: Config = {
    databaseUrl: e.DATABASE_URL ?? DEFAULT_DATABASE_URL,
    idKey: e.PLUMBLINE_ID_KEY ?? null,
    idKeyFile: e.PLUMBLINE_ID_KEY_FILE ?? null,
    pgConnectTimeoutMs: e.PLUMBLINE_PG_CONNECT_TIMEOUT_MS,
    pgStatementTimeoutMs: e.PLUMBLINE_PG_STATEMENT_TIMEOUT_MS,
    facilitators: Object.freeze(e.PLUMBLINE_FACILITATORS),
    retentionDays: e.PLUMBLINE_RETENTION_DAYS,
    host: e.HOST ?? DEFAULT_HOST,
    port: e.PORT,
    logLevel: e.LOG_LEVEL ?? "info",
    replicaId:
      e.PLUMBLINE_REPLICA_ID ?? `${options.hostname ?? hostname()}-${options.pid ?? process.pid}`,
    reportSecret: e.PLUMBLINE_REPORT_SECRET ?? null,
    publicUrl: e.PLUMBLINE_PUBLIC_URL ?? null,
    slack: slackSection(e),
    teams: teamsSection(e),
    teamsDevNoAuth: e.PLUMBLINE_TEAMS_DEV_NO_AUTH === "1",
  };
  return Object.freeze(config);
}

function slackSection(e: ParsedEnv): SlackConfig | null {
  if (e.SLACK_BOT_TOKEN === undefined || e.SLACK_SIGNING_SECRET === undefined) return null;
  return Object.freeze({
    botToken: e.SLACK_BOT_TOKEN,
    signingSecret: e.SLACK_SIGNING_SECRET,
    appToken: e.SLACK_APP_TOKEN ?? null,
    apiUrl: e.SLACK_API_URL ?? null,
  });
}

function teamsSection(e: ParsedEnv): TeamsConfig | null {
  if (e.MICROSOFT_APP_ID === undefined) return null;
  return Object.freeze({
    appId: e.MICROSOFT_APP_ID,
    appPassword: e.MICROSOFT_APP_PASSWORD ?? null,
    appType: e.MICROSOFT_APP_TYPE ?? "SingleTenant",
    tenantId: e.MICROSOFT_APP_TENANT_ID ?? null,
  });
}
