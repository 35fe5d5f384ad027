/**
 * The shared safety suite (safety-contract.ts) on a SQLite file. Kept apart from
 * safety-sqlite.test.ts, whose read-only check runs the CLI as the user `nobody`, so that mutation
 * testing (docs/testing.md) can run this suite in Stryker's private sandbox.
 */
import { mkdtempSync, rmSync } from "node:fs";
import { tmpdir } from "node:os";
import { join } from "node:path";
import Database from "better-sqlite3";
import { afterAll } from "vitest";
import { openSqliteStore } from "../../src/store/open-store.js";
import { safetyContract } from "./safety-contract.js";

const dir = mkdtempSync(join(tmpdir(), "plumbline-safety-contract-"));
afterAll(() => rmSync(dir, { recursive: true, force: true }));
let n = 0;

function dumpFile(path: string): string {
  const raw = new Database(path, { readonly: true });
  try {
    const tables = raw.prepare("SELECT name FROM sqlite_master WHERE type = 'table'").all() as {
      name: string;
    }[];
    return tables
      .map((t) => `${t.name}: ${JSON.stringify(raw.prepare(`SELECT * FROM "${t.name}"`).all())}`)
      .join("\n");
  } finally {
    raw.close();
  }
}

safetyContract("sqlite file", async () => {
  const path = join(dir, `safety-${n++}.db`);
  return {
    childArgs: ["sqlite", path],
    open: (options) => openSqliteStore(path, options),
    dump: async () => dumpFile(path),
    cleanup: async () => undefined,
  };
});

safetyContract("sqlite file", async () => {
  const path = join(dir, `safety-${n++}.db`);
  return {
    childArgs: ["sqlite", path],
    open: (options) => openSqliteStore(path, options),
    dump: async () => dumpFile(path),
    cleanup: async () => undefined,
  };
});
