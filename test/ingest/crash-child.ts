/**
 * Child process of the crash test: ingests deliveries [from, count) of a seeded stream into a
 * SQLite file, one transaction each, and acknowledges each on stdout ("ack <index>") only after
 * `ingest` returned — as a bot answers the platform. The parent kills it with SIGKILL at random.
 * Usage: node --import tsx crash-child.ts <db> <seed> <count> <from>
 */
import { ingest } from "../../src/ingest/ingest.js";
import { openSqliteStore } from "../../src/store/open-store.js";
import { TEST_KEY } from "../store/test-key.js";
import { randomDeliveries } from "./random-events.js";

const [path, seed, count, from] = process.argv.slice(2);
const deliveries = randomDeliveries({
  seed: Number(seed),
  count: Number(count),
  channels: ["c1", "c2"],
});
const store = await openSqliteStore(path, { idKey: TEST_KEY });
for (let i = Number(from); i < deliveries.length; i++) {
  const { event, deliveryKey } = deliveries[i];
  await ingest(store, event, deliveryKey);
  // Writes to a pipe are synchronous on Linux (Node docs, "A note on process I/O").
  process.stdout.write(`ack ${i}\n`);
}
await store.close();
process.stdout.write("done\n");
