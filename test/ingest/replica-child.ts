/**
 * Child process of the replica test: opens the PostgreSQL store in the given schema, says
 * "ready", waits for "go" on stdin, then ingests every delivery of a seeded stream one
 * transaction each (as a bot replica does) and prints "result <applied> <skipped>".
 * Usage: node --import tsx replica-child.ts <url> <schema> <seed> <count>
 */
import { createInterface } from "node:readline";
import { ingest } from "../../src/ingest/ingest.js";
import { openStore } from "../../src/store/open-store.js";
import { TEST_KEY } from "../store/test-key.js";
import { randomDeliveries } from "./random-events.js";

const [url, schema, seed, count] = process.argv.slice(2);
const deliveries = randomDeliveries({
  seed: Number(seed),
  count: Number(count),
  channels: ["c1", "c2", "c3"],
});
// synchronous_commit off: commits stop waiting for the disk flush, which this test does not
// examine; locking and visibility, which it does, are unchanged (PostgreSQL manual, §20.5.1).
const store = await openStore(url, { idKey: TEST_KEY, schema, synchronousCommit: "off" });
process.stdout.write("ready\n");
const input = createInterface({ input: process.stdin });
await new Promise<void>((resolve) => input.once("line", () => resolve()));
input.close();
let applied = 0;
for (const { event, deliveryKey } of deliveries) {
  if ((await ingest(store, event, deliveryKey)).applied) applied++;
}
await store.close();
process.stdout.write(`result ${applied} ${deliveries.length - applied}\n`);
