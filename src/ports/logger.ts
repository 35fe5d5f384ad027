/**
 * @module logger
 * The logging port: a subset of pino's API, so pino is the production logger and tests use a
 * memory logger. Never pass message text to a logger: plumbline never holds it.
 */

export type LogFields = Readonly<Record<string, unknown>>;

export interface Logger {
  debug(fields: LogFields, message: string): void;
  info(fields: LogFields, message: string): void;
  warn(fields: LogFields, message: string): void;
  error(fields: LogFields, message: string): void;
}

export interface LogRecord {
  readonly level: "debug" | "info" | "warn" | "error";
  readonly fields: LogFields;
  readonly message: string;
}

/** Keeps records in memory; for tests and the console. */
export class MemoryLogger implements Logger {
  readonly records: LogRecord[] = [];
  debug(fields: LogFields, message: string): void {
    this.records.push({ level: "debug", fields, message });
  }
  info(fields: LogFields, message: string): void {
    this.records.push({ level: "info", fields, message });
  }
  warn(fields: LogFields, message: string): void {
    this.records.push({ level: "warn", fields, message });
  }
  error(fields: LogFields, message: string): void {
    this.records.push({ level: "error", fields, message });
  }
}

export const silentLogger: Logger = {
  debug: () => {},
  info: () => {},
  warn: () => {},
  error: () => {},
};
