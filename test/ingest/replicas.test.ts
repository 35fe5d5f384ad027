/**
 * Two replicas ingest the same 20,000 deliveries into one PostgreSQL database at the same time.
 * INSERT … ON CONFLICT DO NOTHING on the delivery key is an atomic insert-or-skip even under
 * concurrency (PostgreSQL manual, "INSERT", ON CONFLICT clause), so every delivery must be applied
 * by exactly one of them and the result must equal ingesting the stream once.
 */
import { spawn } from "node:child_process";
import { createInterface } from "node:readline";
import { describe, expect, it } from "vitest";
import { ingestBatch } from "../../src/ingest/ingest.js";
import { createMemoryStore } from "../../src/store/memory-store.js";
import { openStore } from "../../src/store/open-store.js";
import { dropSchema, freshSchema, PG_URL, shouldRunPostgres } from "../store/postgres-env.js";
import { TEST_KEY } from "../store/test-key.js";
import { randomDeliveries } from "./random-events.js";

const run = await shouldRunPostgres();
const CHILD = new URL("./replica-child.ts", import.meta.url).pathname;
const SEED = 23;
const COUNT = 20_000;
const CHANNELS = ["c1", "c2", "c3"];

function startReplica(schema: string) {
  const child = spawn(
    process.execPath,
    ["--import", "tsx", CHILD, PG_URL, schema, String(SEED), String(COUNT)],
    {
      stdio: ["pipe", "pipe", "inherit"],
    },
  );
  const lines = createInterface({ input: child.stdout });
  const ready = new Promise<void>((resolve) => lines.on("line", (l) => l === "ready" && resolve()));
  const result = new Promise<{ applied: number; skipped: number }>((resolve, reject) => {
    lines.on("line", (l) => {
      const m = /^result (\d+) (\d+)$/.exec(l);
      if (m) resolve({ applied: Number(m[1]), skipped: Number(m[2]) });
    });
    child.on("close", (code) => reject(new Error(`replica exited with ${code} before reporting`)));
  });
  return { child, ready, result };
}

describe.skipIf(!run)("replicas", () => {
  it("two replicas ingesting the same 20,000 deliveries give the result of ingesting them once", {
    timeout: 180_000,
  }, async () => {
    const schema = freshSchema();
    const setup = await openStore(PG_URL, { idKey: TEST_KEY, schema, createSchema: true });
    await setup.close();
    const replicas = [startReplica(schema), startReplica(schema)];
    try {
      await Promise.all(replicas.map((r) => r.ready));
      const started = Date.now();
      for (const r of replicas) r.child.stdin.end("go\n");
      const results = await Promise.all(replicas.map((r) => r.result));
      const seconds = (Date.now() - started) / 1000;
      expect(results[0].applied + results[1].applied).toBe(COUNT);
      expect(results.every((r) => r.applied + r.skipped === COUNT)).toBe(true);

      const reference = createMemoryStore({ idKey: TEST_KEY });
      await ingestBatch(
        reference,
        randomDeliveries({ seed: SEED, count: COUNT, channels: CHANNELS }),
      );
      const store = await openStore(PG_URL, { idKey: TEST_KEY, schema });
      for (const channel of CHANNELS) {
        expect(await store.loadSnapshot(channel)).toEqual(await reference.loadSnapshot(channel));
      }
      await store.close();
      console.log(
        `replicas: applied ${results[0].applied} + ${results[1].applied} = ${COUNT} of ${COUNT} in ${seconds.toFixed(1)} s (${Math.round((2 * COUNT) / seconds)} deliveries/s together)`,
      );
    } finally {
      for (const r of replicas) if (r.child.exitCode === null) r.child.kill("SIGKILL");
      await dropSchema(schema);
    }
  });
});
