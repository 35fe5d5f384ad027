/**
 * The log reader's fast paths (issue 12) against what they replaced: line splitting against
 * node:readline itself (`crlfDelay: Infinity`, Node.js documentation of readline), the one-pass
 * record check against the field-by-field check it short-cuts (the same event, or the same error
 * with the same code, line and field), and the character-code time reader against the engine's
 * `Date.parse` (ECMA-262, "Date Time String Format", which reads these shapes as UTC) and against
 * the pattern-based path on the shapes it leaves to it.
 */
import { mkdtempSync, rmSync, writeFileSync } from "node:fs";
import { tmpdir } from "node:os";
import { join } from "node:path";
import { createInterface } from "node:readline";
import { Readable } from "node:stream";
import { describe, expect, it } from "vitest";
import {
  checkedEvent,
  parseEventObject,
  wellFormedEvent,
} from "../../src/attention/parse-event-fields.js";
import { parseIsoTime } from "../../src/attention/parse-iso-time.js";
import { LineSplitter, readEventLogFile } from "../../src/attention/read-event-log.js";
import { createSeededRng } from "../../src/ports/rng.js";

const rng = createSeededRng(12);
const pick = <T>(items: readonly T[]): T => items[Math.floor(rng.next() * items.length)];

async function readlineLines(pieces: readonly string[]): Promise<string[]> {
  const out: string[] = [];
  const lines = createInterface({ input: Readable.from(pieces), crlfDelay: Infinity });
  for await (const line of lines) out.push(line);
  return out;
}

function splitterLines(pieces: readonly string[]): string[] {
  const out: string[] = [];
  const splitter = new LineSplitter((line) => out.push(line));
  for (const piece of pieces) splitter.push(piece);
  splitter.end();
  return out;
}

describe("LineSplitter", () => {
  it("gives node:readline's lines for \\n, \\r\\n and lone \\r, split anywhere", async () => {
    const parts = ["a", "bc", "", " ", "{}", "\n", "\n", "\r\n", "\r", "\r\r\n", "\n\r"];
    for (let trial = 0; trial < 200; trial++) {
      let text = "";
      const length = Math.floor(rng.next() * 40);
      for (let k = 0; k < length; k++) text += pick(parts);
      const pieces: string[] = [];
      for (let at = 0; at < text.length; ) {
        const size = 1 + Math.floor(rng.next() * 6);
        pieces.push(text.slice(at, at + size));
        at += size;
      }
      expect(splitterLines(pieces), JSON.stringify(text)).toEqual(await readlineLines(pieces));
    }
  });

  it("a file ending without a line end keeps its last line; one ending in \\r\\n adds none", () => {
    expect(splitterLines(["x\ny"])).toEqual(["x", "y"]);
    expect(splitterLines(["x\r", "\n"])).toEqual(["x"]);
    expect(splitterLines(["x\r", "y"])).toEqual(["x", "y"]);
  });
});

const ids: unknown[] = ["a", "bo", "", "x".repeat(256), "y".repeat(257), 5, null, ["a"]];
const times = [
  "2026-11-02T09:00:00.000Z",
  "2026-11-02T09:00:00Z",
  "2026-02-29T09:00:00.000Z",
  "2026-11-02T24:00:00.000Z",
  "2026-11-02T09:00+01:00",
  "0050-01-01T00:00:00.000Z",
  7,
];

const VALID: readonly Record<string, unknown>[] = [
  { type: "message", at: times[0], channel: "c1", id: "m1", author: "a" },
  {
    type: "message",
    at: times[1],
    channel: "c1",
    id: "m2",
    author: "b",
    parent: "m1",
    parentAuthor: "a",
    mentions: ["c", "d"],
  },
  { mentions: [], author: "b", id: "m3", channel: "c1", at: times[0], type: "message" },
  { type: "consent", at: times[0], channel: "c1", member: "a", level: "named" },
  { type: "consent", at: times[0], channel: "c1", member: "a", level: "off", notice: "" },
  { type: "edit", at: times[0], channel: "c1", id: "m1", mentions: ["a"] },
  { type: "delete", at: times[0], channel: "c1", id: "m1" },
  { type: "undelete", at: times[0], channel: "c1", id: "m1" },
  { type: "group", at: times[0], channel: "c1", member: "a", group: null },
  { type: "format", at: times[0], channel: "c1", format: "rounds" },
];
const FIELD_NAMES = [
  ...new Set(VALID.flatMap((r) => Object.keys(r))),
  "level",
  "notice",
  "group",
  "format",
  "text",
  "extra",
];
const VALUES: unknown[] = [...ids, ...times, ["a", 3], [""], [], "on", "off", "bogus", "__proto__"];

/** A well-formed record, half the time with one field changed, added or removed. */
function randomRecord(): Record<string, unknown> {
  const record: Record<string, unknown> = { ...pick(VALID) };
  if (rng.next() < 0.5) {
    const field = pick(FIELD_NAMES);
    if (rng.next() < 0.2) delete record[field];
    else record[field] = pick(VALUES);
  }
  return record;
}

function outcome(read: () => unknown): unknown {
  try {
    return { event: read() };
  } catch (error) {
    const { code, line, field, message } = error as Record<string, unknown>;
    return { code, line, field, message };
  }
}

describe("wellFormedEvent (the one-pass check)", () => {
  it("gives checkedEvent's event or checkedEvent's error, on 5,000 random records", () => {
    let fast = 0;
    for (let k = 0; k < 5000; k++) {
      const record = randomRecord();
      if (wellFormedEvent(record) !== null) fast++;
      const expected = outcome(() => checkedEvent(record, k + 1));
      const got = outcome(() => parseEventObject(record, k + 1));
      expect(got).toEqual(expected);
      // Same fields in the same order, as JSON would print them.
      expect(JSON.stringify(got)).toBe(JSON.stringify(expected));
    }
    expect(fast).toBeGreaterThan(2000); // the fast path itself was exercised
  });

  it("leaves every record carrying a content field to checkedEvent's refusal", () => {
    const record = { type: "message", at: times[0], channel: "c1", id: "m", author: "a" };
    expect(wellFormedEvent(record)).not.toBeNull();
    for (const field of ["text", "body", "content", "blocks", "attachments", "links", "files"]) {
      expect(wellFormedEvent({ ...record, [field]: "x" })).toBeNull();
    }
  });
});

describe("parseIsoTime, the character-code shapes", () => {
  it("equals Date.parse on 2,000 random UTC times with and without milliseconds", () => {
    for (let k = 0; k < 2000; k++) {
      const ms = Math.floor(rng.next() * 8e12) - 1e12; // 1938 to 2223
      const text = new Date(ms).toISOString();
      expect(parseIsoTime(text)).toBe(Date.parse(text));
      const seconds = `${text.slice(0, 19)}Z`;
      expect(parseIsoTime(seconds)).toBe(Date.parse(seconds));
      // The comma form goes through the pattern: the same instant.
      expect(parseIsoTime(`${text.slice(0, 19)},${text.slice(20)}`)).toBe(ms);
    }
  });

  it("refuses dates that do not exist in both shapes, and reads years below 100 literally", () => {
    for (const bad of [
      "2026-02-29T09:00:00.000Z",
      "2026-02-29T09:00:00Z",
      "2026-04-31T00:00:00Z",
      "2026-11-02T24:00:00.000Z",
      "2026-11-02T09:60:00.000Z",
      "2026-11-02T09:00:60Z",
      "2026-00-10T00:00:00Z",
      "2026-11-02T09:00:00.000z",
      "2026-11-02T09:00:0a.000Z",
      "2026-11-02 09:00:00.000Z",
    ]) {
      expect(parseIsoTime(bad), bad).toBeNull();
    }
    expect(parseIsoTime("2024-02-29T23:59:59.999Z")).toBe(Date.UTC(2024, 1, 29, 23, 59, 59, 999));
    expect(parseIsoTime("0050-01-01T00:00:00.000Z")).toBe(Date.parse("0050-01-01T00:00:00.000Z"));
  });
});

describe("readEventLogFile across its 1 MiB chunks", () => {
  it("reads a 3 MB log whose lines straddle the chunk ends, with CRLF ends", async () => {
    const dir = mkdtempSync(join(tmpdir(), "plumbline-chunks-"));
    try {
      const path = join(dir, "log.jsonl");
      const lines: string[] = [];
      for (let k = 0; k < 30_000; k++) {
        lines.push(
          `{"type":"message","at":"2026-11-02T09:00:00.000Z","channel":"c1","id":"m${k}","author":"a${k % 9}","mentions":["b${"x".repeat(k % 50)}"]}`,
        );
      }
      writeFileSync(path, `\uFEFF${lines.join("\r\n")}`);
      const { events } = await readEventLogFile(path);
      expect(events.length).toBe(30_000);
      expect(events.map((e) => (e.type === "message" ? e.id : "")).join(",")).toBe(
        lines.map((_, k) => `m${k}`).join(","),
      );
    } finally {
      rmSync(dir, { recursive: true, force: true });
    }
  });
});
