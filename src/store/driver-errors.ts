/**
 * @module driver-errors
 * Maps driver failures to coded errors (common practice: SQLite result codes SQLITE_BUSY,
 * SQLITE_LOCKED, SQLITE_FULL from sqlite.org/rescode.html; PostgreSQL SQLSTATE classes 53
 * "insufficient resources", 55P03 lock_not_available, 40P01 deadlock_detected, 57P0x and 08xxx
 * connection failures from the PostgreSQL manual, appendix A). Unknown errors pass through.
 */
import { PlumblineError } from "../domain/errors.js";

function codeOf(error: unknown): string {
  if (typeof error !== "object" || error === null) return "";
  const code = (error as { code?: unknown }).code;
  return typeof code === "string" ? code : "";
}

function messageOf(error: unknown): string {
  return error instanceof Error ? error.message : String(error);
}

/** TLS certificate failures reported by Node's tls module (its documented error codes). */
const TLS_CODES = new Set([
  "DEPTH_ZERO_SELF_SIGNED_CERT",
  "SELF_SIGNED_CERT_IN_CHAIN",
  "UNABLE_TO_VERIFY_LEAF_SIGNATURE",
  "UNABLE_TO_GET_ISSUER_CERT_LOCALLY",
  "CERT_HAS_EXPIRED",
  "ERR_TLS_CERT_ALTNAME_INVALID",
]);

/** A coded PlumblineError for a known driver failure, else the error itself. */
export function mapDriverError(error: unknown): unknown {
  if (error instanceof PlumblineError) return error;
  const code = codeOf(error);
  const message = messageOf(error);
  if (code.startsWith("SQLITE_READONLY") || code === "25006") {
    return new PlumblineError("STORE_READ_ONLY", "the database is read-only for this process", {
      hint: "make the database file and its folder writable by this user (SQLite writes -wal and -shm files beside it), or point --db / DATABASE_URL at a writable copy",
      cause: error,
    });
  }
  if (
    code.startsWith("SQLITE_TOOBIG") ||
    code === "54000" ||
    code === "54001" ||
    code === "54011" ||
    code === "54023" ||
    /too many (SQL variables|columns|terms)/i.test(message)
  ) {
    return new PlumblineError(
      "STORE_TOO_LARGE",
      `the event is too large for one database statement (${code || message})`,
      {
        hint: "nothing to do for this event: it is recorded as rejected and ingestion goes on",
        cause: error,
      },
    );
  }
  if (/^22[0-9A-Z]{3}$/.test(code)) {
    return new PlumblineError(
      "STORE_BAD_DATA",
      `the database refused a value of the event (SQLSTATE ${code}: ${message})`,
      {
        hint: "nothing to do for this event: it is recorded as rejected and ingestion goes on; check the adapter that produced it",
        cause: error,
      },
    );
  }
  if (
    /does not support SSL|SSL connection|self[- ]signed|certificate/i.test(message) ||
    TLS_CODES.has(code)
  ) {
    return new PlumblineError(
      "STORE_TLS",
      `the TLS connection to the database failed: ${message}`,
      {
        hint: "enable TLS on the server (ssl = on) or, on a trusted network only, remove sslmode=require from DATABASE_URL; for a private CA add sslrootcert=<file>",
        cause: error,
      },
    );
  }
  if (code === "57014" || /timeout expired|connection timeout|Query read timeout/i.test(message)) {
    return new PlumblineError(
      "STORE_UNAVAILABLE",
      `the database did not answer in time (${code === "57014" ? "statement timeout" : message})`,
      {
        hint: "check that DATABASE_URL names a running PostgreSQL server (host, port) and that it is not overloaded; the limits are PLUMBLINE_PG_CONNECT_TIMEOUT_MS and PLUMBLINE_PG_STATEMENT_TIMEOUT_MS",
        cause: error,
      },
    );
  }
  if (code.startsWith("SQLITE_BUSY") || code.startsWith("SQLITE_LOCKED")) {
    return new PlumblineError("STORE_LOCKED", "the database is locked by another writer", {
      hint: "run one writer per SQLite file (use PostgreSQL for several replicas) or retry",
      cause: error,
    });
  }
  if (code.startsWith("SQLITE_FULL") || code === "53100" || code === "53200") {
    return new PlumblineError(
      "STORE_FULL",
      "the database is full; the event in progress was not stored",
      {
        hint: "free disk space (or raise the database's size limit), then retry; run `plumbline purge`",
        cause: error,
      },
    );
  }
  if (code === "55P03" || code === "40P01") {
    return new PlumblineError("STORE_LOCKED", "the database row is locked by another session", {
      hint: "retry the operation",
      cause: error,
    });
  }
  if (
    code === "ECONNREFUSED" ||
    code === "ENOTFOUND" ||
    code === "ECONNRESET" ||
    code === "ETIMEDOUT" ||
    code.startsWith("08") ||
    code.startsWith("57P0") ||
    code === "3D000" ||
    code === "28P01" ||
    code === "28000"
  ) {
    return new PlumblineError("STORE_UNAVAILABLE", `cannot reach the database (${code})`, {
      hint: "check that the server is running and DATABASE_URL (host, port, user, database) is right",
      cause: error,
    });
  }
  return error;
}
