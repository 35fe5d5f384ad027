/**
 * @module messages-route
 * `POST /api/messages` around `CloudAdapter.process`. The SDK expects a parsed body and throws,
 * outside its own error handling, on a body without an activity type (botbuilder 4.23
 * `cloudAdapter.js`; an unauthenticated `{}` crashed the process in our probe), so this route reads
 * the body itself: over 1 MB → 413, not JSON → 400, not an object with a string `type` → 400,
 * and any error escaping the SDK → 500 while the process keeps serving.
 */
import type { IncomingMessage, ServerResponse } from "node:http";
import type { CloudAdapter, TurnContext } from "botbuilder";
import type { Logger } from "../../src/ports/logger.js";
import type { HttpRoute } from "../platform-adapter.js";

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

/** The SDK's response shape (`status`, `header`, `send`, `end`) over a node response. */
function sdkResponse(response: ServerResponse) {
  let status = 200;
  let payload: string | undefined;
  return {
    socket: response.socket,
    status(code: number) {
      status = code;
      return this;
    },
    header(name: string, value: unknown) {
      response.setHeader(name, String(value));
      return this;
    },
    send(body?: unknown) {
      if (body === undefined) return this;
      if (typeof body === "string") payload = body;
      else {
        payload = JSON.stringify(body);
        response.setHeader("content-type", "application/json");
      }
      return this;
    },
    end() {
      if (response.headersSent) return this;
      response.statusCode = status;
      response.end(payload);
      return this;
    },
  };
}

export interface MessagesRouteOptions {
  readonly adapter: CloudAdapter;
  readonly logic: (context: TurnContext) => Promise<void>;
  readonly logger: Logger;
  readonly maxBodyBytes?: number;
}

export function messagesRoute(options: MessagesRouteOptions): HttpRoute {
  const limit = options.maxBodyBytes ?? MAX_BODY_BYTES;
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
      const req = { body: activity, headers: request.headers, method: request.method };
      try {
        await options.adapter.process(req, sdkResponse(response), options.logic);
      } catch (error) {
        options.logger.error(
          { error: error instanceof Error ? error.name : "unknown" },
          "teams activity failed before the turn",
        );
        answer(response, 500, "the activity could not be processed");
      }
    },
  };
}
