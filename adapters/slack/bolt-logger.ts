/**
 * @module bolt-logger
 * The logger handed to Bolt and its Web API client. Bolt's and the SDK's debug lines carry whole
 * payloads (request bodies, `ack()` bodies, message text), so debug is dropped entirely; at the
 * other levels only string arguments are kept (cut short) and errors are reduced to their code.
 * Objects are never passed on: they may be an event payload.
 */
import { LogLevel, type Logger as SlackLogger } from "@slack/bolt";
import type { Logger } from "../../src/ports/logger.js";
import { errorCode } from "./guarded-receiver.js";

const MAX_LINE = 300;

function line(parts: readonly unknown[]): { message: string; errors: string[] } {
  const words: string[] = [];
  const errors: string[] = [];
  for (const part of parts) {
    if (typeof part === "string") words.push(part);
    else if (part instanceof Error) errors.push(errorCode(part));
  }
  const message = words.join(" ");
  return {
    message: message.length > MAX_LINE ? `${message.slice(0, MAX_LINE)}…` : message,
    errors,
  };
}

/** A Bolt logger over ours that never logs a payload. */
export function boltLogger(logger: Logger): SlackLogger {
  let level: LogLevel = LogLevel.INFO;
  let name = "bolt";
  const pass = (at: "info" | "warn" | "error", parts: readonly unknown[]) => {
    const { message, errors } = line(parts);
    logger[at](
      { source: name, ...(errors.length > 0 ? { errors } : {}) },
      message || "(no message)",
    );
  };
  return {
    debug: () => {},
    info: (...parts: unknown[]) => pass("info", parts),
    warn: (...parts: unknown[]) => pass("warn", parts),
    error: (...parts: unknown[]) => pass("error", parts),
    setLevel: (next: LogLevel) => {
      level = next;
    },
    getLevel: () => level,
    setName: (next: string) => {
      name = next;
    },
  };
}
