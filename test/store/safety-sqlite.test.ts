/**
 * Issue 11's store findings on SQLite files: what only a file can show (the shared safety suite
 * runs on SQLite in safety-sqlite-contract.test.ts) — the key file beside the database (missing → refused, generated only for an empty store),
 * every byte of the database, WAL and shared-memory files after `leave` (secure_delete,
 * sqlite.org/pragma.html#pragma_secure_delete), a read-only file, and STORE_FULL's count.
 */
import { spawnSync } from "node:child_process";
import {
  chmodSync,
  existsSync,
  mkdtempSync,
  readFileSync,
  rmSync,
  unlinkSync,
  writeFileSync,
} from "node:fs";
import { tmpdir } from "node:os";
import { join } from "node:path";
import Database from "better-sqlite3";
import { afterAll, describe, expect, it } from "vitest";
import { main } from "../../adapters/local/cli.js";
import { serve } from "../../adapters/serve.js";
import type { ChatEvent } from "../../src/domain/events.js";
import { leave } from "../../src/ingest/erase.js";
import { type Delivery, ingest, ingestBatch } from "../../src/ingest/ingest.js";
import { openSqliteStore, openStore } from "../../src/store/open-store.js";
import { makeConsent } from "../attention/ledger-builders.js";
import { TEST_KEY } from "./test-key.js";

const dir = mkdtempSync(join(tmpdir(), "plumbline-safety-"));
afterAll(() => rmSync(dir, { recursive: true, force: true }));
const T0 = Date.UTC(2026, 10, 2, 9, 0, 0);

function io(env: Record<string, string | undefined> = {}) {
  const out: string[] = [];
  const err: string[] = [];
  return {
    io: { stdout: (s: string) => out.push(s), stderr: (s: string) => err.push(s), env, cwd: dir },
    out,
    err,
  };
}

function writeLog(name: string, events: readonly ChatEvent[]): string {
  writeFileSync(
    join(dir, name),
    `${events.map((e) => JSON.stringify({ ...e, at: new Date(e.at).toISOString() })).join("\n")}\n`,
  );
  return name;
}

describe("SQLite key file", () => {
  it("a deleted key file is refused (exit 2) naming the file; restoring it works again", async () => {
    const log = writeLog("a.jsonl", [makeConsent("U1", "counted"), makeConsent("U2", "counted")]);
    const first = io({});
    expect(await main(["ingest", log, "--db", "sqlite:./k.db"], first.io)).toBe(0);
    const keyFile = join(dir, "k.db.key");
    const key = readFileSync(keyFile, "utf8");
    unlinkSync(keyFile);
    const second = io({});
    expect(await main(["ingest", log, "--db", "sqlite:./k.db"], second.io)).toBe(2);
    expect(second.err.join("")).toContain(`restore the key file ${keyFile}`);
    expect(second.err.join("")).toContain("[STORE_NO_ID_KEY]");
    // No key was generated for the non-empty store.
    expect(existsSync(keyFile)).toBe(false);
    // analyze --db is refused the same way.
    const analysis = io({});
    expect(await main(["analyze", "--db", "sqlite:./k.db", "--channel", "c1"], analysis.io)).toBe(
      2,
    );
    expect(analysis.err.join("")).toContain("[STORE_NO_ID_KEY]");
    writeFileSync(keyFile, key, { mode: 0o600 });
    const third = io({});
    expect(await main(["ingest", log, "--db", "sqlite:./k.db"], third.io)).toBe(0);
    expect(third.out.join("")).toMatch(/2 events, 0 applied, 2 already seen/);
  });

  it("a different PLUMBLINE_ID_KEY_FILE is refused naming that file", async () => {
    const log = writeLog("b.jsonl", [makeConsent("U1", "counted")]);
    expect(await main(["ingest", log, "--db", "sqlite:./f.db"], io({}).io)).toBe(0);
    writeFileSync(join(dir, "wrong.key"), `${TEST_KEY}-wrong\n`);
    const run = io({ PLUMBLINE_ID_KEY_FILE: "wrong.key" });
    expect(await main(["ingest", log, "--db", "sqlite:./f.db"], run.io)).toBe(2);
    expect(run.err.join("")).toContain(`the key file ${join(dir, "wrong.key")}`);
    expect(run.err.join("")).toContain("[STORE_KEY_MISMATCH]");
  });

  it("plumbline rekey rotates the key file; the old key is refused and every event still seen", async () => {
    const events: ChatEvent[] = Array.from({ length: 40 }, (_, i) =>
      makeConsent(`U${i}`, "counted", { at: T0 + i }),
    );
    events.push({
      type: "message",
      at: T0 + 100,
      channel: "c1",
      id: "m1",
      author: "U1",
      mentions: ["U2", "U3"],
    });
    const log = writeLog("r.jsonl", events);
    expect(await main(["ingest", log, "--db", "sqlite:./r.db"], io({}).io)).toBe(0);
    const oldKey = readFileSync(join(dir, "r.db.key"), "utf8");
    const rekey = io({});
    expect(
      await main(["rekey", "--db", "sqlite:./r.db", "--new-key-file", "r-new.key"], rekey.io),
    ).toBe(0);
    expect(rekey.out.join("")).toMatch(
      /re-keyed sqlite:\.\/r\.db: 40 members, \d+ rows in one transaction/,
    );
    const chain = readFileSync(join(dir, "r-new.key"), "utf8");
    expect(chain.startsWith(oldKey.trim())).toBe(true);
    expect(readFileSync(join(dir, "r.db.key"), "utf8")).toBe(chain);
    const again = io({});
    expect(await main(["ingest", log, "--db", "sqlite:./r.db"], again.io)).toBe(0);
    expect(again.out.join("")).toMatch(/41 events, 0 applied, 41 already seen/);
    const old = io({ PLUMBLINE_ID_KEY: oldKey.trim() });
    expect(await main(["ingest", log, "--db", "sqlite:./r.db"], old.io)).toBe(2);
    expect(old.err.join("")).toContain("[STORE_KEY_MISMATCH]");
  });
});

describe("serve and the id key", () => {
  it("serve refuses to start with a key other than the store's, naming the variable", async () => {
    const db = join(dir, "serve.db");
    const store = await openSqliteStore(db, { idKey: TEST_KEY });
    await ingest(store, makeConsent("U1", "counted"), "k1");
    await store.close();
    const env = {
      DATABASE_URL: `sqlite:${db}`,
      HOST: "127.0.0.1",
      PORT: "0",
      PLUMBLINE_TEAMS_DEV_NO_AUTH: "1",
    };
    await expect(
      serve({ env: { ...env, PLUMBLINE_ID_KEY: `${TEST_KEY}-other` }, schedule: false }),
    ).rejects.toMatchObject({
      code: "STORE_KEY_MISMATCH",
      message: expect.stringContaining("PLUMBLINE_ID_KEY"),
    });
    // Without any key the store's own key file is missing: refused, nothing generated.
    await expect(serve({ env, schedule: false })).rejects.toMatchObject({
      code: "STORE_NO_ID_KEY",
      hint: expect.stringContaining(`restore the key file ${db}.key`),
    });
    expect(existsSync(`${db}.key`)).toBe(false);
  });
});

describe("SQLite erasure leaves no bytes behind", () => {
  it("no byte of the database, WAL or shared-memory file names the member after leave", async () => {
    const path = join(dir, "bytes.db");
    const store = await openSqliteStore(path, { idKey: TEST_KEY });
    const leaver = "UBYTES9LEAVER";
    const label = "graveyard-shift-owls";
    const batch: Delivery[] = [
      {
        event: { type: "consent", at: T0, channel: "c1", member: leaver, level: "named" },
        deliveryKey: `cmd:consent:c1:${leaver}`,
      },
      {
        event: { type: "consent", at: T0, channel: "c1", member: "U2", level: "named" },
        deliveryKey: "c2",
      },
      {
        event: { type: "group", at: T0, channel: "c1", member: leaver, group: label },
        deliveryKey: `cmd:group:c1:${label}`,
      },
    ];
    for (let i = 0; i < 300; i++) {
      batch.push({
        event: {
          type: "message",
          at: T0 + i,
          channel: "c1",
          id: `m${i}`,
          author: i % 2 ? leaver : "U2",
          mentions: [i % 2 ? "U2" : leaver],
        },
        deliveryKey: `ev${i}`,
      });
    }
    await ingestBatch(store, batch, { batchSize: 50 });
    const key = store.memberKey(leaver);
    const files = [path, `${path}-wal`, `${path}-shm`];
    const bytes = () => Buffer.concat(files.filter(existsSync).map((f) => readFileSync(f)));
    expect(bytes().includes(leaver)).toBe(true);
    expect(store.pragma("secure_delete")).toEqual([{ secure_delete: 1 }]);
    await leave(store, "c1", leaver);
    // Read while the store is still open (a running bot), then again after closing.
    for (const round of ["open", "closed"]) {
      const all = bytes();
      for (const needle of [leaver, label, key]) {
        expect(all.includes(needle), `${needle} in the files (${round})`).toBe(false);
      }
      if (round === "open") await store.close();
    }
    const raw = new Database(path, { readonly: true });
    expect(raw.pragma("integrity_check")).toEqual([{ integrity_check: "ok" }]);
    expect(raw.prepare("SELECT COUNT(*) FROM message").pluck().get()).toBe(150);
    raw.close();
  });
});

describe("SQLite clear errors", () => {
  it("a read-only database gives STORE_READ_ONLY naming the file (ingest and analyze --db)", async () => {
    const path = join(dir, "ro", "ro.db");
    const store = await openStore(`sqlite:${path}`, { idKey: TEST_KEY });
    await ingest(store, makeConsent("U1", "counted"), "k1");
    await store.close();
    chmodSync(path, 0o444);
    chmodSync(join(dir, "ro"), 0o555);
    chmodSync(dir, 0o755);
    // Root ignores file modes, so the check runs the CLI as the unprivileged user `nobody`.
    const cli = new URL("../../adapters/local/cli.ts", import.meta.url).pathname;
    for (const args of [
      ["ingest", "/dev/null", "--db", `sqlite:${path}`],
      ["analyze", "--db", `sqlite:${path}`, "--channel", "c1"],
    ]) {
      const child = spawnSync(process.execPath, ["--import", "tsx", cli, ...args], {
        env: { ...process.env, PLUMBLINE_ID_KEY: TEST_KEY, HOME: "/tmp" },
        uid: 65534,
        gid: 65534,
        encoding: "utf8",
        cwd: process.cwd(),
      });
      expect(child.status, child.stderr).toBe(2);
      expect(child.stderr).toContain("[STORE_READ_ONLY]");
      expect(child.stderr).toContain(path);
      expect(child.stderr).not.toContain("internal error");
    }
    chmodSync(join(dir, "ro"), 0o755);
  });

  it("STORE_FULL says how many events were committed before the failure", async () => {
    const path = join(dir, "full.db");
    const store = await openSqliteStore(path, { idKey: TEST_KEY });
    const members = Array.from({ length: 20 }, (_, i) => `U${i}`);
    for (const m of members) await ingest(store, makeConsent(m, "counted"), `c-${m}`);
    const [{ page_count: pages }] = store.pragma("page_count") as { page_count: number }[];
    store.pragma(`max_page_count = ${pages + 40}`);
    const deliveries: Delivery[] = Array.from({ length: 5000 }, (_, i) => ({
      event: {
        type: "message",
        at: T0 + i,
        channel: "c1",
        id: `m${i}-${"x".repeat(200)}`,
        author: members[i % 20],
        mentions: [members[(i + 1) % 20]],
      },
      deliveryKey: `k${i}`,
    }));
    const error = await ingestBatch(store, deliveries, { batchSize: 100 }).catch((e: unknown) => e);
    expect(error).toMatchObject({ code: "STORE_FULL" });
    const stored = (await store.loadSnapshot("c1")).messages.length;
    expect(stored).toBeGreaterThan(0);
    expect(stored % 100).toBe(0);
    expect((error as Error).message).toContain(
      `${stored} events were committed before the failure`,
    );
    expect((error as Error).message).not.toContain("nothing was stored");
    await store.close();
  });
});
