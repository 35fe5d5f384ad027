/**
 * Report links: HMAC-SHA256 checked against RFC 4231 (Nystrom 2005, "Identifiers and Test Vectors
 * for HMAC-SHA-224, -256, -384, and -512", test case 2; hex value from memory), base64url without
 * padding (RFC 4648 §5), a 24-hour life measured on an injected clock, and every tampering refused.
 */
import { describe, expect, it } from "vitest";
import {
  hmacSha256Base64url,
  REPORT_TOKEN_TTL_MS,
  signReportToken,
  verifyReportToken,
} from "../../src/report/report-token.js";

const SECRET = "invented-secret-for-tests-0123456789";
const NOW = Date.UTC(2026, 10, 30, 12, 0, 0);

describe("report token", () => {
  it("signs with HMAC-SHA256 (RFC 4231 test case 2) in base64url", () => {
    const hex = "5bdcc146bf60754e6a042426089575c75a003f089d2739839dec58b964ec3843";
    const mac = hmacSha256Base64url("Jefe", "what do ya want for nothing?");
    expect(Buffer.from(mac, "base64url").toString("hex")).toBe(hex);
    expect(mac).toMatch(/^[A-Za-z0-9_-]{43}$/);
  });

  it("accepts a fresh token and returns its claims", () => {
    const token = signReportToken({ channel: "slack:C1", reader: "U1", now: NOW, secret: SECRET });
    expect(token).toMatch(/^[A-Za-z0-9_-]+\.[A-Za-z0-9_-]+$/);
    expect(verifyReportToken(token, { secret: SECRET, now: NOW })).toEqual({
      ok: true,
      claims: { channel: "slack:C1", reader: "U1", expiresAt: NOW + REPORT_TOKEN_TTL_MS },
    });
  });

  it("expires after 24 hours", () => {
    const token = signReportToken({ channel: "c", reader: "r", now: NOW, secret: SECRET });
    const day = 24 * 60 * 60 * 1000;
    expect(verifyReportToken(token, { secret: SECRET, now: NOW + day - 1 }).ok).toBe(true);
    expect(verifyReportToken(token, { secret: SECRET, now: NOW + day })).toEqual({
      ok: false,
      reason: "expired",
    });
    expect(verifyReportToken(token, { secret: SECRET, now: NOW + 30 * day })).toEqual({
      ok: false,
      reason: "expired",
    });
  });

  it("refuses another secret, a changed payload, a changed signature and junk", () => {
    const token = signReportToken({ channel: "c", reader: "r", now: NOW, secret: SECRET });
    const [payload, signature] = token.split(".");
    expect(verifyReportToken(token, { secret: `${SECRET}x`, now: NOW }).ok).toBe(false);
    const forged = Buffer.from(
      JSON.stringify({ c: "c", r: "someone-else", e: NOW + 1e12 }),
    ).toString("base64url");
    expect(verifyReportToken(`${forged}.${signature}`, { secret: SECRET, now: NOW })).toEqual({
      ok: false,
      reason: "bad-signature",
    });
    const flipped = signature.slice(0, -1) + (signature.endsWith("A") ? "B" : "A");
    expect(verifyReportToken(`${payload}.${flipped}`, { secret: SECRET, now: NOW }).ok).toBe(false);
    for (const junk of [
      "",
      ".",
      "abc",
      `${payload}.`,
      `${payload}.${signature}.x`,
      "a b.c",
      `${payload}.${signature}=`,
    ]) {
      expect(verifyReportToken(junk, { secret: SECRET, now: NOW }).ok).toBe(false);
    }
  });

  it("refuses a short secret when signing", () => {
    expect(() => signReportToken({ channel: "c", reader: "r", now: NOW, secret: "short" })).toThrow(
      RangeError,
    );
  });
});
