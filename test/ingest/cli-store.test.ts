import { mkdtempSync, readFileSync, rmSync, writeFileSync } from "node:fs";
import { tmpdir } from "node:os";
import { join } from "node:path";
import { afterAll, describe, expect, it } from "vitest";
import { main } from "../../adapters/local/cli.js";
import { readEventLogFile } from "../../src/attention/read-event-log.js";
import { LATEST_SCHEMA_VERSION, pendingMigrations } from "../../src/store/migrations.js";
import { openStore } from "../../src/store/open-store.js";
import { expectedSnapshot } from "../store/store-contract.js";
import { TEST_KEY } from "../store/test-key.js";
import { randomDeliveries } from "./random-events.js";

const dir = mkdtempSync(join(tmpdir(), "plumbline-cli-"));
afterAll(() => rmSync(dir, { recursive: true, force: true }));

/** The wall clock the commands see (ingest stamps its delivery keys with it): fixed, not today. */
const CLOCK = Date.UTC(2026, 11, 1, 12, 0, 0);

function io(env: Record<string, string | undefined> = {}) {
  const out: string[] = [];
  const err: string[] = [];
  return {
    io: {
      stdout: (s: string) => out.push(s),
      stderr: (s: string) => err.push(s),
      env,
      cwd: dir,
      clock: () => CLOCK,
    },
    out,
    err,
  };
}

/** A log of the seeded stream in the neutral format (times as ISO 8601). */
function writeLog(name: string, count: number): string {
  const lines = randomDeliveries({ seed: 9, count, channels: ["c1", "c2"] }).map(({ event }) =>
    JSON.stringify({ ...event, at: new Date(event.at).toISOString() }),
  );
  writeFileSync(join(dir, name), `${lines.join("\n")}\n`);
  return name;
}

describe("plumbline ingest / migrate / purge", () => {
  it("imports a log once; a second import changes nothing", async () => {
    const log = writeLog("stream.jsonl", 600);
    const env = { DATABASE_URL: "sqlite:./db/cli.db", PLUMBLINE_ID_KEY: TEST_KEY };
    const first = io(env);
    expect(await main(["ingest", log], first.io)).toBe(0);
    expect(first.out.join("")).toBe(
      "ingested stream.jsonl into sqlite:./db/cli.db: 600 events, 600 applied, 0 already seen\n",
    );
    const second = io(env);
    expect(await main(["ingest", log, "--db", "sqlite:./db/cli.db"], second.io)).toBe(0);
    expect(second.out.join("")).toMatch(/600 events, 0 applied, 600 already seen\n$/);

    const { events } = await readEventLogFile(join(dir, log));
    const store = await openStore("sqlite:./db/cli.db", { cwd: dir, idKey: TEST_KEY });
    for (const channel of ["c1", "c2"]) {
      expect(await store.loadSnapshot(channel)).toEqual(expectedSnapshot(store, events, channel));
    }
    await store.close();
  });

  it("migrates and purges with one-line summaries", async () => {
    const env = { DATABASE_URL: "sqlite:./db/maint.db", PLUMBLINE_ID_KEY: TEST_KEY };
    const m1 = io(env);
    const count = pendingMigrations("sqlite", 0).length;
    const applied = `${count} migration${count === 1 ? "" : "s"}`;
    expect(await main(["migrate"], m1.io)).toBe(0);
    expect(m1.out.join("")).toBe(
      `sqlite:./db/maint.db: schema at version ${LATEST_SCHEMA_VERSION} (${applied} applied)\n`,
    );
    const m2 = io(env);
    expect(await main(["migrate"], m2.io)).toBe(0);
    expect(m2.out.join("")).toMatch(/\(0 migrations applied\)\n$/);
    const log = writeLog("maint.jsonl", 300);
    expect(await main(["ingest", log], io(env).io)).toBe(0);
    // The stream starts 2026-11-02; 200 days later every message is past 91 days. Delivery keys
    // carry the injected clock (2026-12-01), so they are past the 0-day dedupe window too, on any
    // calendar date the test is run.
    const purgeAt = new Date("2027-05-21T00:00:00Z");
    const p = io(env);
    expect(await main(["purge", "--now", purgeAt.toISOString(), "--dedupe-days", "0"], p.io)).toBe(
      0,
    );
    expect(p.out.join("")).toMatch(
      /^purged [1-9]\d* ledger messages older than 91 days and 300 delivery keys older than 0 days\n$/,
    );
  });

  it("exits 2 with one line naming the problem and the fix, never a stack trace", async () => {
    const cases: [string[], Record<string, string>, RegExp][] = [
      [["--bogus"], {}, /unknown flag --bogus.*usage: plumbline ingest/],
      [[], {}, /no log given/],
      [
        ["missing.jsonl", "--db", "sqlite::memory:"],
        { PLUMBLINE_ID_KEY: TEST_KEY },
        /LOG_UNREADABLE/,
      ],
      [
        ["bad.jsonl", "--db", "sqlite::memory:"],
        { PLUMBLINE_ID_KEY: TEST_KEY },
        /line 2.*LOG_BAD_JSON/,
      ],
      [["stream.jsonl", "--db", "mysql://x"], {}, /STORE_BAD_URL/],
      [["stream.jsonl", "--db", "memory:"], {}, /PLUMBLINE_ID_KEY.*STORE_NO_ID_KEY/],
    ];
    writeFileSync(
      join(dir, "bad.jsonl"),
      '{"type":"consent","at":"2026-11-02T09:00:00Z","channel":"c1","member":"a","level":"named"}\nnot json\n',
    );
    writeLog("stream.jsonl", 10);
    for (const [argv, env, pattern] of cases) {
      const run = io(env);
      expect(await main(["ingest", ...argv], run.io)).toBe(2);
      const text = run.err.join("");
      expect(text).toMatch(pattern);
      expect(text.trim().split("\n")).toHaveLength(1);
      expect(text).not.toMatch(/\n\s+at /);
    }
    const purgeBad = io({ PLUMBLINE_ID_KEY: TEST_KEY });
    expect(
      await main(["purge", "--retention-days=-3", "--db", "sqlite::memory:"], purgeBad.io),
    ).toBe(2);
    expect(purgeBad.err.join("")).toMatch(/--retention-days must be a whole number/);
    const nowBad = io({ PLUMBLINE_ID_KEY: TEST_KEY });
    expect(await main(["purge", "--now", "yesterday", "--db", "sqlite::memory:"], nowBad.io)).toBe(
      2,
    );
    expect(await main(["migrate", "extra"], io().io)).toBe(2);
  });

  it("uses the default database and a generated key file beside it", async () => {
    const log = writeLog("default.jsonl", 20);
    expect(await main(["ingest", log], io({}).io)).toBe(0);
    expect(readFileSync(join(dir, "data/plumbline.db.key"), "utf8").trim()).toMatch(
      /^[0-9a-f]{64}$/,
    );
  });
});
