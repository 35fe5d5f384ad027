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

/** A coded PlumblineError for a known driver failure, else the error itself. */
export function mapDriverError(error: unknown): unknown {
  if (error instanceof PlumblineError) return error;
  const code = codeOf(error);
  if (code.startsWith("SQLITE_BUSY") || code.startsWith("SQLITE_LOCKED")) {
    return new PlumblineError("STORE_LOCKED", "the database is locked by another writer", {
      hint: "run one writer per SQLite file (use PostgreSQL for several replicas) or retry",
      cause: error,
    });
  }
  if (code.startsWith("SQLITE_FULL") || code === "53100" || code === "53200") {
    return new PlumblineError("STORE_FULL", "the database is full; nothing was stored", {
      hint: "free disk space (or raise the database's size limit), then retry; run `plumbline purge`",
      cause: error,
    });
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
