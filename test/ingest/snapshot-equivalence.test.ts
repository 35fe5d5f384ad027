/**
 * The stores and the log path give the same AnalysisReport (docs/event-semantics.md: "a test
 * ingests logs both ways and compares the reports byte for byte"). Streams use consent levels
 * `named` and `off` only, so every member who can appear in a report is stored under their
 * platform id; members who end `off` are pseudonymous in the store and absent from both reports.
 */
import { describe, expect, it } from "vitest";
import { analyzeSnapshot } from "../../src/analysis/analyze-snapshot.js";
import { buildLedgers } from "../../src/attention/channel-ledger.js";
import { DEFAULT_SETTINGS } from "../../src/domain/settings.js";
import { ingest, ingestBatch } from "../../src/ingest/ingest.js";
import type { Store } from "../../src/ports/store.js";
import { createMemoryStore } from "../../src/store/memory-store.js";
import { openStore } from "../../src/store/open-store.js";
import { dropSchema, freshSchema, PG_URL, shouldRunPostgres } from "../store/postgres-env.js";
import { TEST_KEY } from "../store/test-key.js";
import { randomDeliveries } from "./random-events.js";

const CHANNELS = ["c1", "c2"];
const pg = await shouldRunPostgres();

async function withStore(kind: string, body: (store: Store) => Promise<void>): Promise<void> {
  if (kind === "memory") return body(createMemoryStore({ idKey: TEST_KEY }));
  if (kind === "sqlite") {
    const store = await openStore("sqlite::memory:", { idKey: TEST_KEY });
    return body(store).finally(() => store.close());
  }
  const schema = freshSchema();
  const store = await openStore(PG_URL, { idKey: TEST_KEY, schema, createSchema: true });
  return body(store).finally(async () => {
    await store.close();
    await dropSchema(schema);
  });
}

describe("store snapshots analyse like the log", () => {
  for (const kind of ["memory", "sqlite", ...(pg ? ["postgres"] : [])]) {
    it(`${kind}: byte-identical reports for seeded logs`, async () => {
      for (const seed of [4, 8]) {
        await withStore(kind, async (store) => {
          const deliveries = randomDeliveries({
            seed,
            count: 3000,
            channels: CHANNELS,
            initialLevel: "named",
            levels: ["named", "named", "named", "off"],
          });
          // The first events one per transaction, the rest batched: both paths must agree.
          const half = 300;
          for (const d of deliveries.slice(0, half)) await ingest(store, d.event, d.deliveryKey);
          await ingestBatch(store, deliveries.slice(half), { batchSize: 250 });
          const ledgers = buildLedgers(deliveries.map((d) => d.event));
          for (const channel of CHANNELS) {
            const fromLog = ledgers.get(channel);
            if (fromLog === undefined) throw new Error(`no ${channel} in the stream`);
            const expected = analyzeSnapshot(fromLog, DEFAULT_SETTINGS);
            const actual = analyzeSnapshot(await store.loadSnapshot(channel), DEFAULT_SETTINGS);
            expect(expected.status).toBe("ok");
            expect(JSON.stringify(actual)).toBe(JSON.stringify(expected));
          }
        });
      }
    });
  }
});
