import { mkdtempSync, rmSync } from "node:fs";
import { tmpdir } from "node:os";
import { join } from "node:path";
import { Readable } from "node:stream";
import { fileURLToPath } from "node:url";
import { describe, expect, it } from "vitest";
import {
  parseEventLine,
  readEventLog,
  readEventLogFile,
} from "../../src/attention/read-event-log.js";
import { isPlumblineError, LogLineError } from "../../src/domain/errors.js";
import type { ChatEvent } from "../../src/domain/events.js";

const fixtures = fileURLToPath(new URL("../fixtures/logs/", import.meta.url));

function lineError(text: string, line = 7): LogLineError {
  try {
    parseEventLine(text, line);
  } catch (error) {
    if (error instanceof LogLineError) return error;
    throw error;
  }
  throw new Error(`expected line to be refused: ${text}`);
}

const base = '"at":"2026-11-02T09:00:00Z","channel":"c1"';

describe("parseEventLine: good lines", () => {
  it("returns null for blank and whitespace-only lines", () => {
    expect(parseEventLine("", 1)).toBeNull();
    expect(parseEventLine("   \t ", 2)).toBeNull();
  });

  it("parses each event type of DESIGN.md §3 with `at` in epoch ms", () => {
    const at = Date.UTC(2026, 10, 2, 9, 0, 0);
    expect(parseEventLine(`{"type":"consent",${base},"member":"ana","level":"named"}`, 1)).toEqual({
      type: "consent",
      at,
      channel: "c1",
      member: "ana",
      level: "named",
    });
    expect(
      parseEventLine(
        `{"type":"message",${base},"id":"m2","author":"bo","parent":"m1","parentAuthor":"ana","mentions":["cy"]}`,
        1,
      ),
    ).toEqual({
      type: "message",
      at,
      channel: "c1",
      id: "m2",
      author: "bo",
      parent: "m1",
      parentAuthor: "ana",
      mentions: ["cy"],
    });
    expect(parseEventLine(`{"type":"edit",${base},"id":"m1","mentions":[]}`, 1)).toEqual({
      type: "edit",
      at,
      channel: "c1",
      id: "m1",
      mentions: [],
    });
    expect(parseEventLine(`{"type":"undelete",${base},"id":"m1"}`, 1)?.type).toBe("undelete");
    expect(parseEventLine(`{"type":"group",${base},"member":"cy","group":null}`, 1)).toEqual({
      type: "group",
      at,
      channel: "c1",
      member: "cy",
      group: null,
    });
    // DESIGN.md §3's own format line, and `null` ending a period.
    expect(
      parseEventLine(
        `{"type":"format","at":"2026-11-02T09:11:00Z","channel":"c1","format":"written-first"}`,
        1,
      ),
    ).toEqual({
      type: "format",
      at: Date.UTC(2026, 10, 2, 9, 11, 0),
      channel: "c1",
      format: "written-first",
    });
    expect(parseEventLine(`{"type":"format",${base},"format":null}`, 1)).toEqual({
      type: "format",
      at,
      channel: "c1",
      format: null,
    });
  });

  it("converts zone offsets and fractions (RFC 3339 §5.8 examples, Klyne & Newman 2002; from memory)", () => {
    const event = (time: string): ChatEvent | null =>
      parseEventLine(`{"type":"delete","at":"${time}","channel":"c1","id":"m"}`, 1);
    // "1996-12-19T16:39:57-08:00" is the same instant as 1996-12-20T00:39:57Z.
    expect(event("1996-12-19T16:39:57-08:00")?.at).toBe(Date.UTC(1996, 11, 20, 0, 39, 57));
    expect(event("1985-04-12T23:20:50.52Z")?.at).toBe(Date.UTC(1985, 3, 12, 23, 20, 50, 520));
    // 29 February exists in 2024 (divisible by 4, not by 100): Gregorian rule, common practice.
    expect(event("2024-02-29T00:00+05:30")?.at).toBe(Date.UTC(2024, 1, 28, 18, 30));
  });
});

describe("parseEventLine: every bad-line kind names its code, line and field", () => {
  it("LOG_BAD_JSON for text that is not JSON or not an object", () => {
    for (const text of ["{oops", "[1,2]", "42", "null", '"message"']) {
      const error = lineError(text, 3);
      expect(error.code).toBe("LOG_BAD_JSON");
      expect(error.line).toBe(3);
      expect(error.field).toBeNull();
      expect(error.message).toMatch(/^line 3: /);
    }
  });

  const cases: [string, string, string, RegExp][] = [
    ["missing type", `{${base},"id":"m1"}`, "type", /missing/],
    ["unknown type", `{"type":"reaction",${base},"id":"m1"}`, "type", /one of consent/],
    [
      "at without zone",
      `{"type":"delete","at":"2026-11-02T09:00:00","channel":"c1","id":"m"}`,
      "at",
      /with a zone, like 2026-11-02T09:00:00Z/,
    ],
    [
      "at not a real date",
      `{"type":"delete","at":"2026-02-30T09:00:00Z","channel":"c1","id":"m"}`,
      "at",
      /ISO 8601/,
    ],
    [
      "at hour 24",
      `{"type":"delete","at":"2026-02-03T24:00:00Z","channel":"c1","id":"m"}`,
      "at",
      /ISO 8601/,
    ],
    [
      "at as a number",
      `{"type":"delete","at":1730538000000,"channel":"c1","id":"m"}`,
      "at",
      /ISO 8601/,
    ],
    [
      "empty channel",
      `{"type":"delete","at":"2026-11-02T09:00:00Z","channel":"","id":"m"}`,
      "channel",
      /non-empty string/,
    ],
    ["missing id", `{"type":"delete",${base}}`, "id", /missing/],
    ["id too long", `{"type":"delete",${base},"id":"${"x".repeat(257)}"}`, "id", /at most 256/],
    [
      "author not a string",
      `{"type":"message",${base},"id":"m","author":7}`,
      "author",
      /non-empty string/,
    ],
    [
      "empty parent",
      `{"type":"message",${base},"id":"m","author":"a","parent":""}`,
      "parent",
      /non-empty/,
    ],
    [
      "parentAuthor null",
      `{"type":"message",${base},"id":"m","author":"a","parentAuthor":null}`,
      "parentAuthor",
      /got null/,
    ],
    [
      "bad level",
      `{"type":"consent",${base},"member":"a","level":"yes"}`,
      "level",
      /"off", "counted" or "named"/,
    ],
    [
      "notice not a string",
      `{"type":"consent",${base},"member":"a","level":"off","notice":3}`,
      "notice",
      /string/,
    ],
    [
      "mentions not an array",
      `{"type":"message",${base},"id":"m","author":"a","mentions":"bo"}`,
      "mentions",
      /array of member ids/,
    ],
    [
      "empty mention",
      `{"type":"message",${base},"id":"m","author":"a","mentions":["bo",""]}`,
      "mentions",
      /item 2/,
    ],
    ["edit without mentions", `{"type":"edit",${base},"id":"m"}`, "mentions", /missing/],
    ["group key missing", `{"type":"group",${base},"member":"cy"}`, "group", /missing/],
    [
      "group a number",
      `{"type":"group",${base},"member":"cy","group":5}`,
      "group",
      /or null to clear/,
    ],
    ["format key missing", `{"type":"format",${base}}`, "format", /missing/],
    ["format empty", `{"type":"format",${base},"format":""}`, "format", /or null to end/],
    ["format with a member", `{"type":"format",${base},"format":"x","member":"cy"}`, "member", /./],
    [
      "field not allowed for the type",
      `{"type":"delete",${base},"id":"m","author":"a"}`,
      "author",
      /not allowed on a "delete" event; remove it/,
    ],
    [
      "mentions on a consent",
      `{"type":"consent",${base},"member":"a","level":"off","mentions":[]}`,
      "mentions",
      /not allowed/,
    ],
  ];
  it.each(cases)("LOG_BAD_FIELD: %s", (_name, text, field, message) => {
    const error = lineError(text, 7);
    expect(error.code).toBe("LOG_BAD_FIELD");
    expect(error.line).toBe(7);
    expect(error.field).toBe(field);
    expect(error.message.startsWith(`line 7, field "${field}": `)).toBe(true);
    expect(error.message).toMatch(message);
  });

  it.each(["text", "body", "content", "blocks", "attachments", "links", "files"])(
    "refuses the content field %s on any event type",
    (field) => {
      for (const type of ["message", "edit", "consent"]) {
        const error = lineError(`{"type":"${type}",${base},"${field}":"hello"}`, 2);
        expect(error.code).toBe("LOG_BAD_FIELD");
        expect(error.field).toBe(field);
        expect(error.message).toMatch(/must never carry message content; remove this field/);
      }
    },
  );
});

async function collect(
  input: Readable,
  options: { skipBad?: boolean } = {},
): Promise<{ events: ChatEvent[]; skipped: number[] }> {
  const events: ChatEvent[] = [];
  const skipped: number[] = [];
  for await (const event of readEventLog(input, {
    ...options,
    onSkip: (entry) => skipped.push(entry.line),
  })) {
    events.push(event);
  }
  return { events, skipped };
}

describe("readEventLog / readEventLogFile", () => {
  it("reads the DESIGN.md §3 example with blank and whitespace lines", async () => {
    const { events, skipped } = await readEventLogFile(join(fixtures, "design-example.jsonl"));
    expect(skipped).toEqual([]);
    expect(events.map((e) => e.type)).toEqual([
      "consent",
      "consent",
      "consent",
      "message",
      "message",
      "edit",
      "delete",
      "group",
    ]);
    expect(events[2]).toMatchObject({ member: "cy", notice: "v1" });
  });

  it("reads CRLF line ends and counts lines from 1", async () => {
    const { events } = await readEventLogFile(join(fixtures, "crlf.jsonl"));
    expect(events.map((e) => e.type)).toEqual(["consent", "delete"]);
    const input = Readable.from([
      "\uFEFF",
      '{"type":"delete",',
      `${base},"id":"m"}\r\n\r\n{bad\r\n`,
    ]);
    await expect(collect(input)).rejects.toMatchObject({ code: "LOG_BAD_JSON", line: 3 });
  });

  it("throws the first bad line's error without skipBad", async () => {
    await expect(readEventLogFile(join(fixtures, "mixed-bad.jsonl"))).rejects.toMatchObject({
      code: "LOG_BAD_FIELD",
      line: 2,
      field: "text",
    });
  });

  it("with skipBad counts each bad line and keeps the rest", async () => {
    const { events, skipped } = await readEventLogFile(join(fixtures, "mixed-bad.jsonl"), {
      skipBad: true,
    });
    expect(events.map((e) => e.type)).toEqual(["consent", "consent", "message"]);
    expect(skipped.map((s) => [s.line, s.code])).toEqual([
      [2, "LOG_BAD_FIELD"],
      [3, "LOG_BAD_JSON"],
      [5, "LOG_BAD_FIELD"],
      [7, "LOG_BAD_JSON"],
      [8, "LOG_BAD_FIELD"],
    ]);
    expect(skipped[2].message).toMatch(/^line 5, field "at": /);
    // +01:00 means 08:06 UTC.
    expect(events[1].at).toBe(Date.UTC(2026, 10, 2, 8, 6, 0));
  });

  it("LOG_UNREADABLE names a path that does not exist or is not a file", async () => {
    const dir = mkdtempSync(join(tmpdir(), "plumbline-log-"));
    try {
      const missing = join(dir, "nope.jsonl");
      const error: unknown = await readEventLogFile(missing).catch((e: unknown) => e);
      expect(isPlumblineError(error) && error.code).toBe("LOG_UNREADABLE");
      expect((error as Error).message).toContain(missing);
      await expect(readEventLogFile(dir)).rejects.toMatchObject({ code: "LOG_UNREADABLE" });
    } finally {
      rmSync(dir, { recursive: true, force: true });
    }
  });
});

describe("streaming", () => {
  const total = 100_000;
  function* chunks(pulled: { count: number }): Generator<string> {
    for (let k = 0; k < total; k++) {
      pulled.count++;
      const second = String(k % 60).padStart(2, "0");
      yield `{"type":"message","at":"2026-11-02T09:00:${second}Z","channel":"c1","id":"m${k}","author":"a${k % 7}","mentions":["a${(k + 1) % 7}"]}\n`;
    }
  }

  it("yields the first event long before the input is consumed", async () => {
    const pulled = { count: 0 };
    const input = Readable.from(chunks(pulled), { highWaterMark: 4 });
    const iterator = readEventLog(input);
    const first = await iterator.next();
    expect(first.value).toMatchObject({ id: "m0" });
    // Only a bounded read-ahead has been pulled: the log is not gathered into one string first.
    expect(pulled.count).toBeLessThan(total / 10);
    await iterator.return(undefined);
  });

  it("reads 100 000 generated lines", async () => {
    const pulled = { count: 0 };
    let count = 0;
    let last = "";
    for await (const event of readEventLog(Readable.from(chunks(pulled)))) {
      count++;
      if (event.type === "message") last = event.id;
    }
    expect(count).toBe(total);
    expect(last).toBe(`m${total - 1}`);
  });
});
