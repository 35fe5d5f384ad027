/**
 * Child process of the rekey crash test: opens the store (a SQLite path, or a PostgreSQL schema),
 * starts `rekey` and, half-way through its transaction (after 4 of 9 columns), prints "half" and
 * waits for the parent's SIGKILL.
 * Usage: node --import tsx rekey-child.ts sqlite <path> | postgres <url> <schema>
 */
import { openSqliteStore, openStore } from "../../src/store/open-store.js";
import { SqlStore } from "../../src/store/sql-store.js";
import { TEST_KEY } from "./test-key.js";

const [kind, where, schema] = process.argv.slice(2);
const store =
  kind === "sqlite"
    ? await openSqliteStore(where, { idKey: TEST_KEY })
    : await openStore(where, { idKey: TEST_KEY, schema });
if (!(store instanceof SqlStore)) throw new Error("a SQL store was expected");
let columns = 0;
await store.rekey({
  oldKey: TEST_KEY,
  newSecret: "child-secret-0123456789abcdef0123456789abcdef",
  afterColumn: async () => {
    columns++;
    if (columns === 4) {
      process.stdout.write("half\n");
      await new Promise(() => undefined);
    }
  },
});
process.stdout.write("finished\n");
