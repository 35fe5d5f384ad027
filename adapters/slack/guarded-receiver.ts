/**
 * @module guarded-receiver
 * A Bolt `Receiver` for HTTP mode that plugs into the shared server as the `/slack/events` route.
 * Each request passes the request guard first, then: `url_verification` is answered with its
 * challenge; an Events API envelope without `event_id`, `team_id` or `event`, or a slash command
 * whose team, channel or user id is not shaped like a Slack id (`[A-Z0-9]+`: no NUL, control
 * character or escape sequence reaches the store or a terminal), gets 400; everything
 * else goes to `app.processEvent`. Events API deliveries are answered only after the listeners
 * finish (what Bolt calls `processBeforeResponse`), so a failed ingest answers 500 and Slack
 * retries; slash commands and interactivity are answered as soon as the listener calls `ack()`.
 */
import type { IncomingMessage, ServerResponse } from "node:http";
import type { App, Receiver } from "@slack/bolt";
import type { Logger } from "../../src/ports/logger.js";
import type { HttpRoute } from "../platform-adapter.js";
import { type RateLimitedLog, rateLimitedLog } from "../rate-limited-log.js";
import { isSlackId } from "./channel-ids.js";
import { isRecord } from "./map-message.js";
import { type GuardOptions, guardRequest } from "./request-guard.js";

export const SLACK_EVENTS_PATH = "/slack/events";

export interface GuardedReceiverOptions extends GuardOptions {
  readonly logger: Logger;
}

function send(
  response: ServerResponse,
  status: number,
  body: unknown,
  extraHeaders: Record<string, string> = {},
): void {
  if (response.headersSent) return;
  if (body === undefined || body === "") {
    response.writeHead(status, extraHeaders);
    response.end();
  } else if (typeof body === "string") {
    response.writeHead(status, { "content-type": "text/plain; charset=utf-8", ...extraHeaders });
    response.end(body);
  } else {
    response.writeHead(status, { "content-type": "application/json", ...extraHeaders });
    response.end(JSON.stringify(body));
  }
}

function retryHeaders(request: IncomingMessage): { retryNum?: number; retryReason?: string } {
  const num = Number(request.headers["x-slack-retry-num"]);
  const reason = request.headers["x-slack-retry-reason"];
  return {
    ...(Number.isInteger(num) ? { retryNum: num } : {}),
    ...(typeof reason === "string" ? { retryReason: reason } : {}),
  };
}

/** The first id of a slash command that is not shaped like a Slack id, or null. */
function commandProblem(body: Record<string, unknown>): string | null {
  for (const field of ["team_id", "channel_id", "user_id"]) {
    if (!isSlackId(body[field])) return field;
  }
  return null;
}

/** Missing or malformed envelope field of an `event_callback`, or null when it is complete. */
function envelopeProblem(body: Record<string, unknown>): string | null {
  if (typeof body.event_id !== "string" || body.event_id === "") return "event_id";
  if (!isSlackId(body.team_id)) return "team_id";
  if (!isRecord(body.event) || typeof body.event.type !== "string") return "event.type";
  return null;
}

export class GuardedReceiver implements Receiver {
  private app: App | null = null;
  readonly route: HttpRoute;
  /** Refusals are logged one line each, at most 10 a minute (anyone can send them). */
  private readonly refusals: RateLimitedLog;

  constructor(private readonly options: GuardedReceiverOptions) {
    this.route = { path: SLACK_EVENTS_PATH, handle: (req, res) => this.handle(req, res) };
    this.refusals = rateLimitedLog({ logger: options.logger, now: options.now });
  }

  init(app: App): void {
    this.app = app;
  }

  async start(): Promise<void> {}

  async stop(): Promise<void> {}

  private async handle(request: IncomingMessage, response: ServerResponse): Promise<void> {
    const { logger } = this.options;
    if (request.method !== "POST") {
      request.resume();
      send(response, 405, { ok: false, error: "method not allowed" }, { allow: "POST" });
      return;
    }
    const outcome = await guardRequest(request, this.options);
    if (!outcome.ok) {
      this.refusals(
        "warn",
        { status: outcome.status, reason: outcome.reason },
        "slack request refused",
      );
      const close: Record<string, string> = outcome.status === 413 ? { connection: "close" } : {};
      send(response, outcome.status, { ok: false, error: outcome.reason }, close);
      return;
    }
    const { body } = outcome;
    if (body.type === "url_verification") {
      send(response, 200, { challenge: typeof body.challenge === "string" ? body.challenge : "" });
      return;
    }
    if (body.ssl_check !== undefined) {
      send(response, 200, "");
      return;
    }
    if (outcome.form === "urlencoded" && typeof body.command === "string") {
      const bad = commandProblem(body);
      if (bad !== null) {
        logger.warn({ field: bad }, "slack command with a malformed id; not run");
        send(response, 400, { ok: false, error: `malformed ${bad}` });
        return;
      }
    }
    const isEvent = body.type === "event_callback";
    if (isEvent) {
      const missing = envelopeProblem(body);
      if (missing !== null) {
        logger.warn({ field: missing }, "slack event envelope incomplete; not counted");
        send(response, 400, { ok: false, error: `missing or malformed ${missing}` });
        return;
      }
    } else if (outcome.form === "json") {
      // Other Events API envelope types (e.g. app_rate_limited) need only an acknowledgement.
      if (typeof body.type !== "string") {
        send(response, 400, { ok: false, error: "missing type" });
        return;
      }
      logger.info({ type: body.type }, "slack envelope type not handled");
      send(response, 200, "");
      return;
    }
    await this.dispatch(request, response, body, isEvent);
  }

  private async dispatch(
    request: IncomingMessage,
    response: ServerResponse,
    body: Record<string, unknown>,
    isEvent: boolean,
  ): Promise<void> {
    const app = this.app;
    if (app === null) {
      send(response, 503, { ok: false, error: "not started" });
      return;
    }
    let acked = false;
    let held: unknown;
    const ack = async (reply?: unknown): Promise<void> => {
      if (acked) return;
      acked = true;
      if (isEvent) held = reply;
      else send(response, 200, reply ?? "");
    };
    try {
      await app.processEvent({ body, ack, ...retryHeaders(request) });
      send(response, 200, isEvent ? (held ?? "") : "");
    } catch (error) {
      this.options.logger.error(
        { error: errorCode(error), event: isEvent ? body.event_id : undefined },
        "slack request failed",
      );
      send(response, 500, { ok: false, error: "processing failed" });
    }
  }
}

/** A loggable name for an error: its code when it has one, else its class. Never its payload. */
export function errorCode(error: unknown): string {
  if (isRecord(error) || error instanceof Error) {
    const code = (error as { code?: unknown }).code;
    if (typeof code === "string") return code;
  }
  return error instanceof Error ? error.name : typeof error;
}
