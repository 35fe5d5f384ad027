/**
 * @module member-key
 * Pseudonymous member ids: a keyed HMAC-SHA256 (RFC 2104) of the platform id, hex, truncated to
 * 128 bits (truncation of HMAC output to at least half its length is allowed by RFC 2104 §5).
 * The key lives outside the database: given (`PLUMBLINE_ID_KEY`), read from a key file, or for a
 * SQLite file generated once into `<database>.key` beside it with mode 0600 — only while the
 * store is still empty (DESIGN.md §7).
 *
 * A key may be a chain of secrets, one per line: `plumbline rekey` appends a new secret and
 * re-keys every stored member key k as HMAC(new, k), so the member key of a platform id is the
 * HMAC of each secret in turn. (Platform ids are not stored, so a re-key cannot start from them;
 * after a re-key a stolen old secret alone no longer links a platform id to its rows.)
 *
 * The store keeps the key's fingerprint: an HMAC of a fixed label under the key, never the key.
 */
import { createHmac, randomBytes } from "node:crypto";
import { readFileSync, renameSync, writeFileSync } from "node:fs";
import { PlumblineError } from "../domain/errors.js";

/** Shortest accepted secret, in characters (a 32-byte random key in hex has 64). */
export const MIN_KEY_LENGTH = 32;

/** The fixed label whose HMAC under the key is the key's fingerprint. */
const FINGERPRINT_LABEL = "plumbline member id key fingerprint v1";

export type MemberKeyer = (platformId: string) => string;

/** The secrets of a key text: one per non-empty line, trimmed; each at least 32 characters. */
export function keyParts(secret: string): string[] {
  const parts = secret
    .split(/\r?\n/)
    .map((p) => p.trim())
    .filter((p) => p !== "");
  const short = parts.find((p) => p.length < MIN_KEY_LENGTH);
  if (parts.length === 0 || short !== undefined) {
    throw new PlumblineError(
      "STORE_NO_ID_KEY",
      `the member id key is ${short?.length ?? 0} characters; at least ${MIN_KEY_LENGTH} are needed`,
      { hint: "set PLUMBLINE_ID_KEY to a long random value, e.g. `openssl rand -hex 32`" },
    );
  }
  return parts;
}

/** One step of the chain: HMAC-SHA256 of `value` under `secret`, hex, first 128 bits. */
export function hmac128(secret: string, value: string): string {
  return createHmac("sha256", secret).update(value, "utf8").digest("hex").slice(0, 32);
}

/** An HMAC keyer for one key (or chain); the same key always gives the same member keys. */
export function createMemberKeyer(secret: string): MemberKeyer {
  const parts = keyParts(secret);
  return (platformId) => parts.reduce((value, part) => hmac128(part, value), platformId);
}

/** The fingerprint the store keeps: HMAC-SHA256 of a fixed label under the whole key. */
export function keyFingerprint(secret: string): string {
  return createHmac("sha256", keyParts(secret).join("\n"))
    .update(FINGERPRINT_LABEL, "utf8")
    .digest("hex");
}

export interface KeySource {
  /** The key itself (e.g. from PLUMBLINE_ID_KEY). */
  readonly idKey?: string;
  /** A file holding the key. */
  readonly idKeyFile?: string;
}

/** Where a key came from, named the way an operator sets it. */
export interface ResolvedKey {
  readonly key: string;
  /** e.g. "PLUMBLINE_ID_KEY" or "the key file /srv/p.db.key". */
  readonly origin: string;
  /** The file the key was read from (or would be generated at), if any. */
  readonly file: string | null;
  /** True when the key was generated just now (the caller must check the store is empty). */
  readonly generated: boolean;
}

/**
 * Resolves the id key: `idKey`, else `idKeyFile`, else (when `generateAt` is given) the file
 * there. `mayGenerate` says whether a missing file there may be created with a fresh key (only
 * for an empty store); otherwise a missing key is refused, naming the file and what to restore.
 */
export function resolveIdKey(
  source: KeySource,
  generateAt: string | null,
  mayGenerate = true,
): ResolvedKey {
  if (source.idKey !== undefined && source.idKey !== "") {
    return { key: source.idKey, origin: "PLUMBLINE_ID_KEY", file: null, generated: false };
  }
  if (source.idKeyFile !== undefined && source.idKeyFile !== "") {
    return {
      key: readKeyFile(source.idKeyFile),
      origin: `the key file ${source.idKeyFile} (PLUMBLINE_ID_KEY_FILE)`,
      file: source.idKeyFile,
      generated: false,
    };
  }
  if (generateAt !== null) {
    const origin = `the key file ${generateAt}`;
    try {
      return { key: readFileSync(generateAt, "utf8"), origin, file: generateAt, generated: false };
    } catch (error) {
      if (!isCode(error, "ENOENT")) {
        throw new PlumblineError(
          "STORE_NO_ID_KEY",
          `cannot read the member id key file ${generateAt}`,
          {
            hint: "make the key file readable, or set PLUMBLINE_ID_KEY",
            cause: error,
          },
        );
      }
    }
    if (!mayGenerate) throw missingKey(generateAt);
    return { key: generateKeyFile(generateAt), origin, file: generateAt, generated: true };
  }
  throw new PlumblineError(
    "STORE_NO_ID_KEY",
    "no member id key: PostgreSQL and in-memory stores need one",
    {
      hint: "set PLUMBLINE_ID_KEY (or PLUMBLINE_ID_KEY_FILE); every replica must use the same key",
    },
  );
}

/** STORE_NO_ID_KEY for a store that holds data but whose key file is gone. */
export function missingKey(file: string): PlumblineError {
  return new PlumblineError(
    "STORE_NO_ID_KEY",
    `the member id key file ${file} is missing, but the store already holds data keyed with it`,
    {
      hint: `restore the key file ${file} or set PLUMBLINE_ID_KEY to the key this store was created with (a new key would split every member's history)`,
    },
  );
}

/** STORE_KEY_MISMATCH naming where the wrong key came from. */
export function mismatchedKey(origin: string): PlumblineError {
  const restore = origin.startsWith("the key file")
    ? `restore ${origin.replace(/ \(PLUMBLINE_ID_KEY_FILE\)$/, "")}`
    : "restore the key file";
  return new PlumblineError(
    "STORE_KEY_MISMATCH",
    `the member id key from ${origin} is not the key this store was created with`,
    {
      hint: `${restore} or set PLUMBLINE_ID_KEY to the key this store was created with (after a \`plumbline rekey\`, use the file given as --new-key-file)`,
    },
  );
}

function readKeyFile(path: string): string {
  try {
    return readFileSync(path, "utf8");
  } catch (error) {
    throw new PlumblineError("STORE_NO_ID_KEY", `cannot read the member id key file ${path}`, {
      hint: "check PLUMBLINE_ID_KEY_FILE, or set PLUMBLINE_ID_KEY instead",
      cause: error,
    });
  }
}

function generateKeyFile(path: string): string {
  const key = randomBytes(32).toString("hex");
  try {
    writeFileSync(path, `${key}\n`, { mode: 0o600, flag: "wx" });
  } catch (error) {
    // Another process created it first: use theirs.
    if (isCode(error, "EEXIST")) return readFileSync(path, "utf8");
    throw new PlumblineError("STORE_NO_ID_KEY", `cannot write the member id key file ${path}`, {
      hint: "make the database folder writable, or set PLUMBLINE_ID_KEY",
      cause: error,
    });
  }
  return key;
}

/** Writes a key file atomically (temporary file, then rename), mode 0600. */
export function writeKeyFileAtomic(path: string, key: string): void {
  const temporary = `${path}.${process.pid}.tmp`;
  writeFileSync(temporary, `${keyParts(key).join("\n")}\n`, { mode: 0o600 });
  renameSync(temporary, path);
}

/** A fresh random secret (32 bytes, hex). */
export function randomSecret(): string {
  return randomBytes(32).toString("hex");
}

function isCode(error: unknown, code: string): boolean {
  return typeof error === "object" && error !== null && (error as { code?: unknown }).code === code;
}
