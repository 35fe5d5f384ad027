/**
 * @module messages-route
 * `POST /api/messages` around `CloudAdapter.process`. The SDK expects a parsed body and throws,
 * outside its own error handling, on a body without an activity type (botbuilder 4.23
 * `cloudAdapter.js`; an unauthenticated `{}` crashed the process in our probe), so this route reads
 * the body itself: over 1 MB → 413, not JSON → 400, not an object with a string `type` → 400.
 * The request is then authenticated apart from the turn: any failure there (a bad token, or keys
 * that cannot be fetched) is 401 with an empty body and one rate-limited log line naming the
 * error's class, never the SDK's message (which held a fetch error). An authenticated activity
 * with an id that is not printable ASCII (`malformedIdField`) gets 400. An error in the turn itself
 * answers 500, so Teams redelivers, while the process keeps serving. Whatever the SDK prints to
 * the console meanwhile goes to the log as one short debug line (`sdk-console.ts`).
 */
import type { IncomingMessage, ServerResponse } from "node:http";
import type { Activity, CloudAdapter, TurnContext } from "botbuilder";
import type { Logger } from "../../src/ports/logger.js";
import type { HttpRoute } from "../platform-adapter.js";
import { type RateLimitedLog, rateLimitedLog } from "../rate-limited-log.js";
import { malformedIdField } from "./activity-fields.js";
import { withSdkConsole } from "./sdk-console.js";

export const MESSAGES_PATH = "/api/messages";
export const MAX_BODY_BYTES = 1024 * 1024;

type BodyResult = { ok: true; body: Buffer } | { ok: false };

function readBody(request: IncomingMessage, limit: number): Promise<BodyResult> {
  return new Promise((resolve, reject) => {
    const chunks: Buffer[] = [];
    let size = 0;
    let over = false;
    request.on("data", (chunk: Buffer) => {
      if (over) return;
      size += chunk.length;
      if (size > limit) {
        over = true;
        chunks.length = 0;
        resolve({ ok: false });
        return;
      }
      chunks.push(chunk);
    });
    request.on("end", () => {
      if (!over) resolve({ ok: true, body: Buffer.concat(chunks) });
    });
    request.on("error", reject);
  });
}

function answer(response: ServerResponse, status: number, message: string): void {
  if (response.headersSent) return;
  response.writeHead(status, { "content-type": "text/plain; charset=utf-8" });
  response.end(`${message}\n`);
}

/** The activity object of a body, or null when it is none. */
export function parseActivityBody(body: Buffer): Record<string, unknown> | null {
  let value: unknown;
  try {
    value = JSON.parse(body.toString("utf8"));
  } catch {
    return null;
  }
  if (typeof value !== "object" || value === null || Array.isArray(value)) return null;
  const type = (value as Record<string, unknown>).type;
  return typeof type === "string" && type !== "" ? (value as Record<string, unknown>) : null;
}

/** What `authenticate` gives and the turn takes (a type of botframework-connector, via botbuilder). */
type AuthenticateRequestResult = Exclude<
  Parameters<CloudAdapter["processActivityDirect"]>[0],
  string
>;

/** Dates of the activity as the SDK's own `validateAndFixActivity` sets them (botbuilder 4.23). */
function fixDates(activity: Record<string, unknown>): Activity {
  for (const [field, raw] of [
    ["timestamp", "rawTimestamp"],
    ["expiration", "rawExpiration"],
    ["localTimestamp", "rawLocalTimestamp"],
  ] as const) {
    const value = activity[field];
    if (typeof value === "string") {
      activity[raw] = value;
      activity[field] = new Date(value);
    }
  }
  return activity as unknown as Activity;
}

export interface MessagesRouteOptions {
  readonly adapter: CloudAdapter;
  /** Checks the request's token (the adapter's `BotFrameworkAuthentication.authenticateRequest`). */
  readonly authenticate: (
    activity: Activity,
    authHeader: string,
  ) => Promise<AuthenticateRequestResult>;
  readonly logic: (context: TurnContext) => Promise<void>;
  readonly logger: Logger;
  /** Epoch ms, for the refusal log's rate limit. */
  readonly now: () => number;
  readonly maxBodyBytes?: number;
}

function authHeaderOf(request: IncomingMessage): string {
  const value = request.headers.authorization;
  return typeof value === "string" ? value : "";
}

export function messagesRoute(options: MessagesRouteOptions): HttpRoute {
  const limit = options.maxBodyBytes ?? MAX_BODY_BYTES;
  const refusals: RateLimitedLog = rateLimitedLog({ logger: options.logger, now: options.now });
  const sdkLine = ({ method, error }: { method: string; error: string }) =>
    options.logger.debug({ method, error }, "teams sdk console output");
  return {
    path: MESSAGES_PATH,
    async handle(request, response) {
      if (request.method !== "POST") {
        answer(response, 405, "POST activities here");
        return;
      }
      const declared = Number(request.headers["content-length"] ?? "0");
      if (Number.isFinite(declared) && declared > limit) {
        response.setHeader("connection", "close");
        answer(response, 413, "body over 1 MB");
        request.resume();
        return;
      }
      const read = await readBody(request, limit);
      if (!read.ok) {
        response.setHeader("connection", "close");
        answer(response, 413, "body over 1 MB");
        request.resume();
        return;
      }
      const activity = parseActivityBody(read.body);
      if (activity === null) {
        answer(response, 400, "the body must be a JSON activity with a type");
        return;
      }
      const fixed = fixDates(activity);
      await withSdkConsole(sdkLine, async () => {
        let auth: AuthenticateRequestResult;
        try {
          auth = await options.authenticate(fixed, authHeaderOf(request));
        } catch (error) {
          refusals(
            "warn",
            { status: 401, error: error instanceof Error ? error.name : typeof error },
            "teams request refused",
          );
          response.writeHead(401);
          response.end();
          return;
        }
        const malformed = malformedIdField(fixed);
        if (malformed !== null) {
          refusals("warn", { status: 400, field: malformed }, "teams activity with a malformed id");
          answer(response, 400, `malformed ${malformed}`);
          return;
        }
        try {
          await options.adapter.processActivityDirect(auth, fixed, options.logic);
          if (!response.headersSent) {
            response.writeHead(200);
            response.end();
          }
        } catch (error) {
          options.logger.error(
            { error: error instanceof Error ? error.name : "unknown" },
            "teams activity failed",
          );
          answer(response, 500, "the activity could not be processed");
        }
      });
    },
  };
}
