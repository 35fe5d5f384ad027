/**
 * @module request-guard
 * Checks every request to `/slack/events` before Bolt sees it, because Bolt itself reads bodies of
 * any size and accepts timestamps from the future (research notes, reliability §2). In order: a
 * body over 1 MB gets 413 before any parsing (the rest is drained, not kept); a missing or wrong
 * signature, or a timestamp more than 5 minutes off in either direction, gets 401 (Slack's v0
 * scheme: HMAC-SHA256 keyed with the signing secret over `v0:<timestamp>:<raw body>`, compared in
 * constant time); a well-signed body that is not valid JSON or form data gets 400.
 */
import { createHmac, timingSafeEqual } from "node:crypto";
import type { IncomingMessage } from "node:http";
import { isRecord } from "./map-message.js";

/** Largest accepted body (1 MB). */
export const MAX_BODY_BYTES = 1024 * 1024;
/** Largest accepted distance between Slack's timestamp and ours, in seconds. */
export const MAX_CLOCK_SKEW_SECONDS = 300;
/** Beyond this much discarded body the connection is cut instead of drained. */
const MAX_DRAIN_BYTES = 16 * MAX_BODY_BYTES;

export type GuardOutcome =
  | {
      readonly ok: true;
      readonly body: Record<string, unknown>;
      /** The form of the body: Events API JSON, or a form post (commands, interactivity). */
      readonly form: "json" | "urlencoded";
    }
  | { readonly ok: false; readonly status: 400 | 401 | 413; readonly reason: string };

export interface GuardOptions {
  readonly signingSecret: string;
  /** Epoch ms, injected so tests can move the clock. */
  readonly now: () => number;
  readonly maxBodyBytes?: number;
}

type BodyRead = { readonly ok: true; readonly raw: Buffer } | { readonly ok: false };

/** Reads the body up to `limit` bytes; past it, drains without keeping and reports too large. */
export function readCappedBody(request: IncomingMessage, limit: number): Promise<BodyRead> {
  return new Promise((resolve, reject) => {
    const declared = Number(request.headers["content-length"]);
    let tooLarge = Number.isFinite(declared) && declared > limit;
    const chunks: Buffer[] = [];
    let size = 0;
    request.on("data", (chunk: Buffer) => {
      size += chunk.length;
      if (size > limit) tooLarge = true;
      if (tooLarge) {
        chunks.length = 0;
        if (size > MAX_DRAIN_BYTES) {
          request.destroy();
          resolve({ ok: false });
        }
        return;
      }
      chunks.push(chunk);
    });
    request.on("end", () =>
      resolve(tooLarge ? { ok: false } : { ok: true, raw: Buffer.concat(chunks) }),
    );
    request.on("error", reject);
  });
}

function header(request: IncomingMessage, name: string): string | undefined {
  const value = request.headers[name];
  return typeof value === "string" ? value : undefined;
}

/** The v0 signature Slack would send for this timestamp and body. */
export function slackSignature(
  signingSecret: string,
  timestamp: string,
  raw: Buffer | string,
): string {
  const hmac = createHmac("sha256", signingSecret);
  hmac.update(`v0:${timestamp}:`);
  hmac.update(raw);
  return `v0=${hmac.digest("hex")}`;
}

/** Null when the signature and timestamp are good, else why not. */
export function checkSignature(
  options: GuardOptions,
  timestamp: string | undefined,
  signature: string | undefined,
  raw: Buffer,
): string | null {
  if (timestamp === undefined || signature === undefined) return "missing signature headers";
  if (!/^\d{1,12}$/.test(timestamp)) return "malformed timestamp";
  const skew = Math.abs(options.now() / 1000 - Number(timestamp));
  if (skew > MAX_CLOCK_SKEW_SECONDS) return "timestamp outside the 5-minute window";
  const expected = Buffer.from(slackSignature(options.signingSecret, timestamp, raw));
  const given = Buffer.from(signature);
  if (given.length !== expected.length || !timingSafeEqual(given, expected)) {
    return "signature mismatch";
  }
  return null;
}

function parse(raw: Buffer, contentType: string): GuardOutcome {
  const type = contentType.split(";")[0].trim().toLowerCase();
  try {
    if (type === "application/x-www-form-urlencoded") {
      const params = Object.fromEntries(new URLSearchParams(raw.toString("utf8")));
      if (typeof params.payload === "string") {
        const payload: unknown = JSON.parse(params.payload);
        if (!isRecord(payload))
          return { ok: false, status: 400, reason: "payload is not an object" };
        return { ok: true, body: payload, form: "urlencoded" };
      }
      return { ok: true, body: params, form: "urlencoded" };
    }
    const body: unknown = JSON.parse(raw.toString("utf8"));
    if (!isRecord(body)) return { ok: false, status: 400, reason: "body is not a JSON object" };
    return { ok: true, body, form: "json" };
  } catch {
    return { ok: false, status: 400, reason: "malformed body" };
  }
}

/** Reads, authenticates and parses one request (see the module header for the order). */
export async function guardRequest(
  request: IncomingMessage,
  options: GuardOptions,
): Promise<GuardOutcome> {
  const read = await readCappedBody(request, options.maxBodyBytes ?? MAX_BODY_BYTES);
  if (!read.ok) return { ok: false, status: 413, reason: "body too large" };
  const problem = checkSignature(
    options,
    header(request, "x-slack-request-timestamp"),
    header(request, "x-slack-signature"),
    read.raw,
  );
  if (problem !== null) return { ok: false, status: 401, reason: problem };
  return parse(read.raw, header(request, "content-type") ?? "application/json");
}
