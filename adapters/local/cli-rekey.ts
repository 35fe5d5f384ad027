/**
 * @module cli-rekey
 * `plumbline rekey --new-key-file F [--db URL]`: rotates the member id key (DESIGN.md §7). The
 * store is opened with its current key (PLUMBLINE_ID_KEY, PLUMBLINE_ID_KEY_FILE or the SQLite
 * `<db>.key`), F's secret is added to it (F is created with a fresh random secret when missing),
 * and every stored member key is re-keyed in one transaction (src/store/sql-rekey.ts). F is
 * rewritten with the whole new key before the transaction starts, so whatever happens the old key
 * stays valid until the commit and the new one is on disk after it; a SQLite store's own
 * `<db>.key` is then replaced by it. Replicas must be restarted with F's content.
 */
import { existsSync, readFileSync } from "node:fs";
import { resolve } from "node:path";
import { PlumblineError } from "../../src/domain/errors.js";
import { keyParts, randomSecret, writeKeyFileAtomic } from "../../src/store/member-key.js";
import { openStore } from "../../src/store/open-store.js";
import { SqlStore } from "../../src/store/sql-store.js";
import { parseCommandArgs } from "./cli-flags.js";
import type { CliIo } from "./cli-io.js";
import { databaseUrl, redact, storeOptions } from "./cli-store.js";

const USAGE = "plumbline rekey --new-key-file FILE [--db URL]";

export async function runRekey(argv: readonly string[], io: CliIo): Promise<number> {
  const parsed = parseCommandArgs(
    argv,
    { db: { type: "string" }, "new-key-file": { type: "string" } },
    USAGE,
  );
  if (parsed.positionals.length > 0) {
    throw new PlumblineError("ARG_UNKNOWN", `unexpected argument "${parsed.positionals[0]}"`, {
      hint: `usage: ${USAGE}`,
    });
  }
  const flag = parsed.values["new-key-file"];
  if (typeof flag !== "string" || flag === "") {
    throw new PlumblineError("ARG_MISSING", "no --new-key-file given", {
      hint: `usage: ${USAGE} (the file is created with a fresh key when missing)`,
    });
  }
  const newFile = resolve(io.cwd, flag);
  const url = databaseUrl(parsed.values.db, io);
  const store = await openStore(url, storeOptions(io));
  try {
    if (!(store instanceof SqlStore)) {
      throw new PlumblineError("ARG_BAD_VALUE", "the memory store keeps nothing to re-key", {
        hint: "give --db sqlite:<path> or --db postgres://…",
      });
    }
    const current = keyParts(store.idKey.key);
    const secret = newSecret(newFile, current);
    if (store.idKey.file !== null && resolve(store.idKey.file) === newFile) {
      throw new PlumblineError("ARG_BAD_VALUE", "--new-key-file is the store's current key file", {
        hint: "give a new file, e.g. --new-key-file ./data/plumbline.key.new",
      });
    }
    const next = [...current, secret].join("\n");
    writeKeyFileAtomic(newFile, next);
    const result = await store.rekey({ oldKey: store.idKey.key, newSecret: secret });
    const own =
      store.idKey.file !== null && store.idKey.origin === `the key file ${store.idKey.file}`;
    if (own && store.idKey.file !== null) writeKeyFileAtomic(store.idKey.file, result.key);
    io.stdout(
      `re-keyed ${redact(url)}: ${result.members} members, ${result.rows} rows in one transaction; the key is now in ${flag}${own ? ` (and ${store.idKey.file})` : ""}: give it to every replica (PLUMBLINE_ID_KEY_FILE=${flag})\n`,
    );
  } finally {
    await store.close();
  }
  return 0;
}

/** The secret F adds: F's own (one secret, or the chain a previous run wrote), else a new one. */
function newSecret(file: string, current: readonly string[]): string {
  if (!existsSync(file)) return randomSecret();
  const parts = keyParts(readFileSync(file, "utf8"));
  // A run that stopped after writing F: F holds the current key plus the new secret.
  if (parts.length === current.length + 1 && current.every((p, i) => parts[i] === p)) {
    return parts[parts.length - 1];
  }
  if (parts.length === 1) return parts[0];
  throw new PlumblineError("ARG_BAD_VALUE", `${file} holds a key chain that is not this store's`, {
    hint: "give a file with one new secret (e.g. `openssl rand -hex 32 > new.key`) or a path that does not exist yet",
  });
}
