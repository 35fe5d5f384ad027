/**
 * @module errors
 * One coded error type for everything a user can cause. Callers compare `code`, never the message.
 * Every message names the fix; `hint` carries it separately for surfaces that show it apart.
 */

/** Stable error codes. Adding one is fine; renaming one breaks callers and scripts. */
export type ErrorCode =
  | "LOG_BAD_JSON"
  | "LOG_BAD_FIELD"
  | "LOG_UNREADABLE"
  | "ARG_UNKNOWN"
  | "ARG_BAD_VALUE"
  | "ARG_MISSING"
  | "RANGE_BAD"
  | "SETTING_BAD_VALUE"
  | "NO_CONVERGENCE"
  | "NO_UNIQUE_SHARES"
  | "CAP_INFEASIBLE"
  | "STORE_NEWER_THAN_CODE"
  | "STORE_LOCKED"
  | "STORE_FULL"
  | "STORE_UNAVAILABLE"
  | "STORE_BAD_URL"
  | "STORE_NO_ID_KEY"
  | "STORE_KEY_MISMATCH"
  | "STORE_READ_ONLY"
  | "STORE_TLS"
  | "STORE_TOO_LARGE"
  | "STORE_REJECTED"
  | "STORE_BAD_DATA"
  | "CONFIG_INVALID"
  | "ANALYSIS_BUSY";

export class PlumblineError extends Error {
  readonly code: ErrorCode;
  /** What the user should do about it, in one sentence. */
  readonly hint: string;

  constructor(code: ErrorCode, message: string, options: { hint?: string; cause?: unknown } = {}) {
    super(message, options.cause === undefined ? undefined : { cause: options.cause });
    this.name = "PlumblineError";
    this.code = code;
    this.hint = options.hint ?? "";
  }
}

/** Raised by the event-log reader: carries the line number and field of the problem. */
export class LogLineError extends PlumblineError {
  readonly line: number;
  readonly field: string | null;

  constructor(
    code: "LOG_BAD_JSON" | "LOG_BAD_FIELD",
    line: number,
    field: string | null,
    message: string,
  ) {
    super(code, `line ${line}${field ? `, field "${field}"` : ""}: ${message}`);
    this.name = "LogLineError";
    this.line = line;
    this.field = field;
  }
}

export function isPlumblineError(value: unknown): value is PlumblineError {
  return value instanceof PlumblineError;
}
