import pg from "pg";
import { describe, expect, it } from "vitest";
import { LATEST_SCHEMA_VERSION, pendingMigrations } from "../../src/store/migrations.js";
import { openStore } from "../../src/store/open-store.js";
import { dropSchema, freshSchema, PG_URL, shouldRunPostgres } from "./postgres-env.js";
import { storeContract } from "./store-contract.js";
import { TEST_KEY } from "./test-key.js";

const run = await shouldRunPostgres();

describe.skipIf(!run)("PostgreSQL store", () => {
  storeContract("postgres", async () => {
    const schema = freshSchema();
    const store = await openStore(PG_URL, { idKey: TEST_KEY, schema, createSchema: true });
    return {
      store,
      cleanup: async () => {
        await store.close();
        await dropSchema(schema);
      },
    };
  });

  it("migrates concurrent openers once and refuses a newer schema", async () => {
    const schema = freshSchema();
    try {
      const applied: number[] = [];
      const opts = {
        idKey: TEST_KEY,
        schema,
        createSchema: true,
        onMigrated: (i: { applied: number }) => applied.push(i.applied),
      };
      const stores = await Promise.all([
        openStore(PG_URL, opts),
        openStore(PG_URL, opts),
        openStore(PG_URL, opts),
      ]);
      expect(applied.sort()).toEqual([0, 0, pendingMigrations("postgres", 0).length]);
      for (const s of stores) await s.close();
      const client = new pg.Client({ connectionString: PG_URL });
      await client.connect();
      await client.query(
        `UPDATE ${schema}.plumbline_schema SET version = ${LATEST_SCHEMA_VERSION + 1}`,
      );
      await client.end();
      await expect(openStore(PG_URL, { idKey: TEST_KEY, schema })).rejects.toMatchObject({
        code: "STORE_NEWER_THAN_CODE",
      });
    } finally {
      await dropSchema(schema);
    }
  });

  it("needs an id key and reports an unreachable server as STORE_UNAVAILABLE", async () => {
    await expect(openStore(PG_URL, { schema: freshSchema() })).rejects.toMatchObject({
      code: "STORE_NO_ID_KEY",
    });
    await expect(
      openStore("postgres://postgres@127.0.0.1:1/none", { idKey: TEST_KEY }),
    ).rejects.toMatchObject({
      code: "STORE_UNAVAILABLE",
    });
  });
});
