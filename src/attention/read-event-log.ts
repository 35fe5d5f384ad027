/**
 * @module read-event-log
 * Reader of the neutral event log (DESIGN.md §3): JSON Lines, one `ChatEvent` per line, blank lines
 * allowed, read as a stream line by line (node:readline), so a log of any length never sits in
 * memory as one string. Each line is checked field by field; a problem is a `LogLineError` naming
 * the line, the field and the fix. A field that would carry message content is refused outright.
 */
import { open } from "node:fs/promises";
import { createInterface } from "node:readline";
import type { Readable } from "node:stream";
import { LogLineError, PlumblineError } from "../domain/errors.js";
import type { ChatEvent } from "../domain/events.js";
import { parseEventObject } from "./parse-event-fields.js";

/** A line left out under `skipBad`. */
export interface SkippedLine {
  readonly line: number;
  readonly code: string;
  readonly message: string;
}

export interface ReadEventLogOptions {
  /** Skip bad lines (reporting each to `onSkip`) instead of throwing at the first. */
  readonly skipBad?: boolean;
  /** Called for each skipped line when `skipBad` is on. */
  readonly onSkip?: (skipped: SkippedLine) => void;
}

/**
 * Parses one log line (1-based `line` for messages): null for a blank line, else the event with
 * `at` in epoch ms. Throws `LogLineError` with `LOG_BAD_JSON` or `LOG_BAD_FIELD`.
 */
export function parseEventLine(text: string, line: number): ChatEvent | null {
  if (text.trim() === "") return null;
  let value: unknown;
  try {
    value = JSON.parse(text);
  } catch {
    throw new LogLineError(
      "LOG_BAD_JSON",
      line,
      null,
      'not valid JSON; each line must be one JSON object, like {"type":"message",...}',
    );
  }
  if (typeof value !== "object" || value === null || Array.isArray(value)) {
    throw new LogLineError(
      "LOG_BAD_JSON",
      line,
      null,
      'expected a JSON object, like {"type":"message",...}',
    );
  }
  return parseEventObject(value as Record<string, unknown>, line);
}

/** Streams the events of a JSON Lines log from `input`, in file order. */
export async function* readEventLog(
  input: Readable,
  options: ReadEventLogOptions = {},
): AsyncGenerator<ChatEvent, void, undefined> {
  const lines = createInterface({ input, crlfDelay: Number.POSITIVE_INFINITY });
  let line = 0;
  try {
    for await (const raw of lines) {
      line++;
      const text = line === 1 && raw.charCodeAt(0) === 0xfeff ? raw.slice(1) : raw;
      let event: ChatEvent | null;
      try {
        event = parseEventLine(text, line);
      } catch (error) {
        if (!(options.skipBad && error instanceof LogLineError)) throw error;
        options.onSkip?.({ line, code: error.code, message: error.message });
        continue;
      }
      if (event !== null) yield event;
    }
  } finally {
    lines.close();
  }
}

/**
 * Reads a whole log file into memory as events (the stream is still read line by line).
 * Throws `LOG_UNREADABLE` naming `path` when it cannot be opened or read.
 */
export async function readEventLogFile(
  path: string,
  options: { readonly skipBad?: boolean } = {},
): Promise<{ events: ChatEvent[]; skipped: SkippedLine[] }> {
  let handle: Awaited<ReturnType<typeof open>>;
  try {
    handle = await open(path, "r");
  } catch (error) {
    throw unreadable(path, error);
  }
  const events: ChatEvent[] = [];
  const skipped: SkippedLine[] = [];
  const stream = handle.createReadStream({ encoding: "utf8" });
  try {
    for await (const event of readEventLog(stream, {
      skipBad: options.skipBad ?? false,
      onSkip: (entry) => skipped.push(entry),
    })) {
      events.push(event);
    }
  } catch (error) {
    if (error instanceof PlumblineError) throw error;
    throw unreadable(path, error);
  } finally {
    stream.destroy();
    await handle.close().catch(() => undefined);
  }
  return { events, skipped };
}

function unreadable(path: string, cause: unknown): PlumblineError {
  const reason = cause instanceof Error && "code" in cause ? ` (${String(cause.code)})` : "";
  return new PlumblineError("LOG_UNREADABLE", `Cannot read the event log "${path}"${reason}.`, {
    hint: "Check that the path names a readable JSON Lines file.",
    cause,
  });
}
