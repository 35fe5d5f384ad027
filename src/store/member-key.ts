/**
 * @module member-key
 * Pseudonymous member ids: a keyed HMAC-SHA256 (RFC 2104) of the platform id, hex, truncated to
 * 128 bits (truncation of HMAC output to at least half its length is allowed by RFC 2104 §5).
 * The key lives outside the database: given (`PLUMBLINE_ID_KEY`), read from a key file, or for a
 * SQLite file generated once into `<database>.key` beside it with mode 0600.
 */
import { createHmac, randomBytes } from "node:crypto";
import { readFileSync, writeFileSync } from "node:fs";
import { PlumblineError } from "../domain/errors.js";

/** Shortest accepted key, in characters (a 32-byte random key in hex has 64). */
export const MIN_KEY_LENGTH = 32;

export type MemberKeyer = (platformId: string) => string;

/** An HMAC keyer for one secret; the same secret always gives the same member keys. */
export function createMemberKeyer(secret: string): MemberKeyer {
  if (secret.length < MIN_KEY_LENGTH) {
    throw new PlumblineError(
      "STORE_NO_ID_KEY",
      `the member id key is ${secret.length} characters; at least ${MIN_KEY_LENGTH} are needed`,
      { hint: "set PLUMBLINE_ID_KEY to a long random value, e.g. `openssl rand -hex 32`" },
    );
  }
  return (platformId) =>
    createHmac("sha256", secret).update(platformId, "utf8").digest("hex").slice(0, 32);
}

export interface KeySource {
  /** The key itself (e.g. from PLUMBLINE_ID_KEY). */
  readonly idKey?: string;
  /** A file holding the key. */
  readonly idKeyFile?: string;
}

/**
 * Resolves the id key: `idKey`, else `idKeyFile`, else (when `generateAt` is given) the file
 * there, created with a fresh random key on first use. Without any of these it fails with
 * STORE_NO_ID_KEY naming the settings to give.
 */
export function resolveIdKey(source: KeySource, generateAt: string | null): string {
  if (source.idKey !== undefined && source.idKey !== "") return source.idKey;
  if (source.idKeyFile !== undefined && source.idKeyFile !== "") {
    return readKeyFile(source.idKeyFile, false);
  }
  if (generateAt !== null) return readKeyFile(generateAt, true);
  throw new PlumblineError(
    "STORE_NO_ID_KEY",
    "no member id key: PostgreSQL and in-memory stores need one",
    {
      hint: "set PLUMBLINE_ID_KEY (or PLUMBLINE_ID_KEY_FILE); every replica must use the same key",
    },
  );
}

function readKeyFile(path: string, generate: boolean): string {
  try {
    return readFileSync(path, "utf8").trim();
  } catch (error) {
    if (!generate || !isCode(error, "ENOENT")) {
      throw new PlumblineError("STORE_NO_ID_KEY", `cannot read the member id key file ${path}`, {
        hint: "check PLUMBLINE_ID_KEY_FILE, or set PLUMBLINE_ID_KEY instead",
        cause: error,
      });
    }
  }
  const key = randomBytes(32).toString("hex");
  try {
    writeFileSync(path, `${key}\n`, { mode: 0o600, flag: "wx" });
  } catch (error) {
    // Another process created it first: use theirs.
    if (isCode(error, "EEXIST")) return readFileSync(path, "utf8").trim();
    throw new PlumblineError("STORE_NO_ID_KEY", `cannot write the member id key file ${path}`, {
      hint: "make the database folder writable, or set PLUMBLINE_ID_KEY",
      cause: error,
    });
  }
  return key;
}

function isCode(error: unknown, code: string): boolean {
  return typeof error === "object" && error !== null && (error as { code?: unknown }).code === code;
}
