/**
 * @module report-token
 * The signed link to a report page (`/reports/<token>`): the channel, the reader and an expiry,
 * signed with HMAC-SHA256 under a server secret (Krawczyk, Bellare & Canetti 1997, RFC 2104
 * "HMAC"; SHA-256 per FIPS 180-4) and written in base64url without padding (RFC 4648 §5). The
 * token is `payload.signature`; verification recomputes the signature over the payload bytes,
 * compares in constant time, then checks the expiry against an injected `now`. Pure: no clock,
 * no store.
 */
import { createHmac, timingSafeEqual } from "node:crypto";

/** A report link lives 24 hours. */
export const REPORT_TOKEN_TTL_MS = 24 * 60 * 60 * 1000;

export interface ReportTokenClaims {
  readonly channel: string;
  /** Platform id of the member the link was made for. */
  readonly reader: string;
  /** Epoch ms after which the link is refused. */
  readonly expiresAt: number;
}

export type TokenCheck =
  | { readonly ok: true; readonly claims: ReportTokenClaims }
  | { readonly ok: false; readonly reason: "malformed" | "bad-signature" | "expired" };

/** HMAC-SHA256 of `data` under `secret`, base64url without padding. */
export function hmacSha256Base64url(secret: string, data: string): string {
  return createHmac("sha256", secret).update(data, "utf8").digest("base64url");
}

/** Signs a link for `reader` in `channel`, valid for `ttlMs` (24 h) from `now`. */
export function signReportToken(args: {
  channel: string;
  reader: string;
  now: number;
  secret: string;
  ttlMs?: number;
}): string {
  if (args.secret.length < 16) throw new RangeError("report secret must be at least 16 characters");
  const claims = {
    c: args.channel,
    r: args.reader,
    e: args.now + (args.ttlMs ?? REPORT_TOKEN_TTL_MS),
  };
  const payload = Buffer.from(JSON.stringify(claims), "utf8").toString("base64url");
  return `${payload}.${hmacSha256Base64url(args.secret, payload)}`;
}

const PART = /^[A-Za-z0-9_-]+$/;

/** Checks a token's form, signature and expiry; `now` is epoch ms. */
export function verifyReportToken(
  token: string,
  args: { secret: string; now: number },
): TokenCheck {
  const parts = token.split(".");
  if (parts.length !== 2 || !PART.test(parts[0]) || !PART.test(parts[1]) || token.length > 2048) {
    return { ok: false, reason: "malformed" };
  }
  const [payload, signature] = parts;
  const expected = Buffer.from(hmacSha256Base64url(args.secret, payload), "base64url");
  const given = Buffer.from(signature, "base64url");
  if (given.length !== expected.length || !timingSafeEqual(given, expected)) {
    return { ok: false, reason: "bad-signature" };
  }
  let parsed: unknown;
  try {
    parsed = JSON.parse(Buffer.from(payload, "base64url").toString("utf8"));
  } catch {
    return { ok: false, reason: "malformed" };
  }
  if (typeof parsed !== "object" || parsed === null) return { ok: false, reason: "malformed" };
  const { c, r, e } = parsed as Record<string, unknown>;
  if (
    typeof c !== "string" ||
    typeof r !== "string" ||
    typeof e !== "number" ||
    !Number.isFinite(e)
  ) {
    return { ok: false, reason: "malformed" };
  }
  if (args.now >= e) return { ok: false, reason: "expired" };
  return { ok: true, claims: { channel: c, reader: r, expiresAt: e } };
}
