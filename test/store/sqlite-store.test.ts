import { mkdtempSync, readFileSync, rmSync, statSync, writeFileSync } from "node:fs";
import { tmpdir } from "node:os";
import { join } from "node:path";
import Database from "better-sqlite3";
import { afterAll, describe, expect, it } from "vitest";
import type { ChatEvent } from "../../src/domain/events.js";
import { leave } from "../../src/ingest/erase.js";
import { type Delivery, ingest, ingestBatch } from "../../src/ingest/ingest.js";
import { LATEST_SCHEMA_VERSION, pendingMigrations } from "../../src/store/migrations.js";
import { openSqliteStore, openStore, parseStoreUrl } from "../../src/store/open-store.js";
import { storeContract } from "./store-contract.js";
import { TEST_KEY } from "./test-key.js";

const dir = mkdtempSync(join(tmpdir(), "plumbline-sqlite-"));
afterAll(() => rmSync(dir, { recursive: true, force: true }));
let n = 0;

storeContract("sqlite file", async () => {
  const path = join(dir, `contract-${n++}.db`);
  const store = await openSqliteStore(path, { idKey: TEST_KEY });
  return {
    store,
    openPeer: () => openSqliteStore(path, { idKey: TEST_KEY }),
    cleanup: () => store.close(),
  };
});

storeContract("sqlite :memory:", async () => {
  const store = await openStore("sqlite::memory:", { idKey: TEST_KEY });
  return { store, cleanup: () => store.close() };
});

describe("SQLite store", () => {
  it("schema 3 keeps the facilitator role's platform id, filled in from named members on upgrade", async () => {
    const path = join(dir, "upgrade-v1.db");
    const keys = await openStore("sqlite::memory:", { idKey: TEST_KEY });
    const [named, counted] = [keys.memberKey("FNAMED"), keys.memberKey("FCOUNTED")];
    await keys.close();
    const raw = new Database(path);
    for (const statement of pendingMigrations("sqlite", 0)[0].statements) raw.exec(statement);
    raw.exec("CREATE TABLE plumbline_schema (version INTEGER NOT NULL)");
    raw.exec("INSERT INTO plumbline_schema (version) VALUES (1)");
    raw.prepare("INSERT INTO named_member VALUES ('c1', ?, 'FNAMED')").run(named);
    raw.prepare("INSERT INTO facilitator VALUES ('c1', ?)").run(named);
    raw.prepare("INSERT INTO facilitator VALUES ('c1', ?)").run(counted);
    raw.close();
    const store = await openSqliteStore(path, { idKey: TEST_KEY });
    expect(store.schemaVersion).toBe(LATEST_SCHEMA_VERSION);
    // Version 1 kept no id for a counted facilitator: left out until added again.
    expect(await store.facilitatorPlatformIds("c1")).toEqual(["FNAMED"]);
    await store.addFacilitator("c1", "FCOUNTED");
    expect(await store.facilitatorPlatformIds("c1")).toEqual(["FCOUNTED", "FNAMED"]);
    expect(await store.listFacilitators("c1")).toHaveLength(2);
    await store.close();
  });

  it("sets WAL, synchronous and the busy timeout on every open", async () => {
    const path = join(dir, "pragmas.db");
    for (const synchronous of ["NORMAL", "FULL"] as const) {
      const store = await openSqliteStore(path, {
        idKey: TEST_KEY,
        synchronous,
        busyTimeoutMs: 1234,
      });
      expect(store.pragma("journal_mode")).toEqual([{ journal_mode: "wal" }]);
      // sqlite.org/pragma.html#pragma_synchronous: NORMAL = 1, FULL = 2.
      expect(store.pragma("synchronous")).toEqual([
        { synchronous: synchronous === "NORMAL" ? 1 : 2 },
      ]);
      expect(store.pragma("busy_timeout")).toEqual([{ timeout: 1234 }]);
      await store.close();
    }
  });

  it("creates the folder and a 0600 key file beside the database, and reuses it", async () => {
    const url = "sqlite:./nested/deeper/p.db";
    const first = await openStore(url, { cwd: dir });
    const key = first.memberKey("U1");
    await first.close();
    const keyFile = join(dir, "nested/deeper/p.db.key");
    expect(statSync(keyFile).mode & 0o777).toBe(0o600);
    const second = await openStore(url, { cwd: dir });
    expect(second.memberKey("U1")).toBe(key);
    await second.close();
    // DESIGN.md §7: a different key is refused, naming where it came from and what to restore.
    await expect(openStore(url, { cwd: dir, idKey: `${TEST_KEY}-other` })).rejects.toMatchObject({
      code: "STORE_KEY_MISMATCH",
      message: expect.stringContaining("PLUMBLINE_ID_KEY"),
    });
  });

  it("migrates once, records the version, and refuses a database newer than the code", async () => {
    const path = join(dir, "versions.db");
    const runs: number[] = [];
    const a = await openSqliteStore(path, {
      idKey: TEST_KEY,
      onMigrated: (i) => runs.push(i.applied),
    });
    expect(a.schemaVersion).toBe(LATEST_SCHEMA_VERSION);
    await a.close();
    const b = await openSqliteStore(path, {
      idKey: TEST_KEY,
      onMigrated: (i) => runs.push(i.applied),
    });
    await b.close();
    // Versions may skip numbers while branches merge: count the migrations, not the version.
    expect(runs).toEqual([pendingMigrations("sqlite", 0).length, 0]);
    const raw = new Database(path);
    raw.prepare("UPDATE plumbline_schema SET version = ?").run(LATEST_SCHEMA_VERSION + 1);
    raw.close();
    await expect(openSqliteStore(path, { idKey: TEST_KEY })).rejects.toMatchObject({
      code: "STORE_NEWER_THAN_CODE",
    });
  });

  // Message text never reaches the store: the neutral events carry none (the log reader refuses
  // it), the Slack and Teams tests feed real payloads with a sentinel text and grep the database
  // for it, and here the schema itself is checked to have no column that could hold it.
  it("stores no platform id for counted members and has no column for text", async () => {
    const path = join(dir, "privacy.db");
    const store = await openSqliteStore(path, { idKey: TEST_KEY });
    const at = Date.UTC(2026, 10, 2);
    await ingest(
      store,
      { type: "consent", at, channel: "c1", member: "SECRET_COUNTED", level: "counted" },
      "a",
    );
    await ingest(
      store,
      { type: "consent", at, channel: "c1", member: "VISIBLE_NAMED", level: "named" },
      "b",
    );
    await ingest(
      store,
      {
        type: "message",
        at,
        channel: "c1",
        id: "m1",
        author: "SECRET_COUNTED",
        mentions: ["VISIBLE_NAMED"],
      },
      "c",
    );
    await store.close();
    const raw = new Database(path, { readonly: true });
    const tables = raw.prepare("SELECT name FROM sqlite_master WHERE type = 'table'").all() as {
      name: string;
    }[];
    const dump = tables
      .map((t) => JSON.stringify(raw.prepare(`SELECT * FROM "${t.name}"`).all()))
      .join("\n");
    const columns = tables.flatMap((t) =>
      (raw.prepare(`PRAGMA table_info("${t.name}")`).all() as { name: string }[]).map(
        (c) => `${t.name}.${c.name}`,
      ),
    );
    raw.close();
    expect(columns.length).toBeGreaterThan(10);
    expect(
      columns.filter((c) => /\.(text|body|content|blocks|attachments|files|links)$/i.test(c)),
    ).toEqual([]);
    expect(dump).not.toContain("SECRET_COUNTED");
    expect(dump.split("VISIBLE_NAMED").length - 1).toBe(1); // only in named_member
  });

  it("text handed to the store anyway is not kept: a message event carrying text, blocks and files", async () => {
    // The check above proves there is no text column; this one feeds text in, as an adapter bug
    // would (extra fields on the event object), and greps every row of every table for it.
    const path = join(dir, "text-fed.db");
    const store = await openSqliteStore(path, { idKey: TEST_KEY });
    const at = Date.UTC(2026, 10, 2);
    const SENTINEL = "SENTINEL_TEXT_7f3a";
    for (const [k, member] of ["A1", "B2"].entries()) {
      await ingest(store, { type: "consent", at, channel: "c1", member, level: "named" }, `k${k}`);
    }
    const leaky = {
      type: "message",
      at: at + 1,
      channel: "c1",
      id: "m1",
      author: "A1",
      mentions: ["B2"],
      text: `${SENTINEL} the message body`,
      blocks: [{ type: "rich_text", elements: [{ type: "text", text: SENTINEL }] }],
      files: [{ name: `${SENTINEL}.pdf` }],
    } as unknown as ChatEvent;
    await ingest(store, leaky, "k-msg");
    const edit = {
      type: "edit",
      at: at + 2,
      channel: "c1",
      id: "m1",
      mentions: ["B2"],
      text: SENTINEL,
    };
    await ingest(store, edit as unknown as ChatEvent, "k-edit");
    const snapshot = await store.loadSnapshot("c1");
    expect(JSON.stringify(snapshot)).not.toContain(SENTINEL);
    await store.close();
    const raw = new Database(path, { readonly: true });
    const tables = raw.prepare("SELECT name FROM sqlite_master WHERE type = 'table'").all() as {
      name: string;
    }[];
    const dump = tables
      .map((t) => JSON.stringify(raw.prepare(`SELECT * FROM "${t.name}"`).all()))
      .join("\n");
    raw.close();
    // The message itself was stored (its mention is in the ledger), so the check is not empty.
    expect(snapshot.lastEventAt).toBe(at + 2);
    expect(dump).not.toContain(SENTINEL);
    const bytes = readFileSync(path);
    expect(bytes.includes(Buffer.from(SENTINEL))).toBe(false);
  });

  it("leave removes every row naming a member with 1,000 ledger rows", async () => {
    const path = join(dir, "leave.db");
    const store = await openSqliteStore(path, { idKey: TEST_KEY });
    const at = Date.UTC(2026, 10, 2);
    const batch: Delivery[] = ["LEAVER", "U2", "U3"].map((member, i) => ({
      event: { type: "consent", at, channel: "c1", member, level: "named" },
      deliveryKey: `c${i}`,
    }));
    for (let i = 0; i < 1000; i++) {
      const author = i % 2 === 0 ? "LEAVER" : "U2";
      batch.push({
        event: {
          type: "message",
          at: at + i,
          channel: "c1",
          id: `m${i}`,
          author,
          parent: `m${i - 1}`,
          mentions: ["LEAVER", "U3"],
        },
        deliveryKey: `m${i}`,
      });
    }
    await ingestBatch(store, batch);
    await store.addFacilitator("c1", "LEAVER");
    const started = process.hrtime.bigint();
    await leave(store, "c1", "LEAVER");
    const ms = Number(process.hrtime.bigint() - started) / 1e6;
    const key = store.memberKey("LEAVER");
    await store.close();
    const raw = new Database(path, { readonly: true });
    const tables = raw.prepare("SELECT name FROM sqlite_master WHERE type = 'table'").all() as {
      name: string;
    }[];
    const dump = tables
      .map((t) => JSON.stringify(raw.prepare(`SELECT * FROM "${t.name}"`).all()))
      .join("\n");
    const messages = raw.prepare("SELECT COUNT(*) FROM message").pluck().get();
    raw.close();
    expect(dump).not.toContain(key);
    expect(dump).not.toContain("LEAVER");
    expect(messages).toBe(500);
    console.log(
      `leave: 0 rows left naming the member after erasing ~2,500 rows in ${ms.toFixed(1)} ms`,
    );
  });

  it("rejects bad URLs naming the accepted forms", () => {
    for (const url of [
      "",
      "mysql://x",
      "sqlite:",
      "sqlite://host/x",
      "postgres://",
      "file:./x.db",
    ]) {
      expect(() => parseStoreUrl(url)).toThrow(expect.objectContaining({ code: "STORE_BAD_URL" }));
    }
    expect(() => parseStoreUrl("nope")).toThrow(/sqlite::memory:.*postgres:\/\//);
    expect(parseStoreUrl("sqlite:///tmp/a.db")).toEqual({ kind: "sqlite", path: "/tmp/a.db" });
    expect(parseStoreUrl("sqlite:a.db", "/srv")).toEqual({ kind: "sqlite", path: "/srv/a.db" });
    expect(parseStoreUrl("postgresql://u@h/db")).toEqual({
      kind: "postgres",
      url: "postgresql://u@h/db",
    });
  });

  it("reports an unusable database folder as STORE_UNAVAILABLE", async () => {
    const blocker = join(dir, "not-a-folder");
    writeFileSync(blocker, "");
    await expect(openStore(`sqlite:${blocker}/x.db`, { idKey: TEST_KEY })).rejects.toMatchObject({
      code: "STORE_UNAVAILABLE",
    });
  });

  it("requires an id key where no key file can live beside the database", async () => {
    await expect(openStore("sqlite::memory:")).rejects.toMatchObject({ code: "STORE_NO_ID_KEY" });
    await expect(openStore("memory:")).rejects.toMatchObject({ code: "STORE_NO_ID_KEY" });
    await expect(
      openStore("memory:", { idKeyFile: join(dir, "missing.key") }),
    ).rejects.toMatchObject({
      code: "STORE_NO_ID_KEY",
    });
  });
});
