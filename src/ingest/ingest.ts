/**
 * @module ingest
 * Idempotent ingestion (DESIGN.md §8): the delivery key is inserted with ON CONFLICT DO NOTHING
 * and the event's changes are applied only if the key was new, all in one transaction. The caller
 * acknowledges the platform only after `ingest` resolves; a thrown error (STORE_LOCKED,
 * STORE_FULL, STORE_UNAVAILABLE) means nothing of the event was stored and it must not be acked.
 */
import type { ChatEvent } from "../domain/events.js";
import type { Store } from "../ports/store.js";
import { applyEvent } from "./apply-event.js";

export interface IngestOptions {
  /** When the delivery arrived (epoch ms), for the 7-day dedupe window; default Date.now(). */
  readonly receivedAt?: number;
}

export interface Delivery {
  readonly event: ChatEvent;
  readonly deliveryKey: string;
}

/** Applies one delivery once; `applied` is false when its key was seen before. */
export async function ingest(
  store: Store,
  event: ChatEvent,
  deliveryKey: string,
  options: IngestOptions = {},
): Promise<{ applied: boolean }> {
  const receivedAt = options.receivedAt ?? Date.now();
  return store.transaction(async (tx) => {
    if (!(await tx.addDelivery(deliveryKey, receivedAt))) return { applied: false };
    await applyEvent({ tx, memberKey: (id) => store.memberKey(id) }, event);
    return { applied: true };
  });
}

export interface IngestBatchOptions extends IngestOptions {
  /** Deliveries per transaction; default 500. */
  readonly batchSize?: number;
  /** Called after each committed batch with the running totals. */
  readonly onBatch?: (progress: { applied: number; skipped: number }) => void;
}

/**
 * Applies deliveries in order, `batchSize` per transaction (for imports). A failure rolls back only
 * the batch in progress; earlier batches stay committed and re-running the import skips them.
 */
export async function ingestBatch(
  store: Store,
  deliveries: Iterable<Delivery> | AsyncIterable<Delivery>,
  options: IngestBatchOptions = {},
): Promise<{ applied: number; skipped: number }> {
  const size = Math.max(1, Math.trunc(options.batchSize ?? 500));
  const totals = { applied: 0, skipped: 0 };
  let pending: Delivery[] = [];
  const flush = async (): Promise<void> => {
    const batch = pending;
    pending = [];
    const receivedAt = options.receivedAt ?? Date.now();
    const result = await store.transaction(async (tx) => {
      let applied = 0;
      for (const delivery of batch) {
        if (await tx.addDelivery(delivery.deliveryKey, receivedAt)) {
          await applyEvent({ tx, memberKey: (id) => store.memberKey(id) }, delivery.event);
          applied++;
        }
      }
      return applied;
    });
    totals.applied += result;
    totals.skipped += batch.length - result;
    options.onBatch?.({ ...totals });
  };
  for await (const delivery of deliveries) {
    pending.push(delivery);
    if (pending.length >= size) await flush();
  }
  if (pending.length > 0) await flush();
  return totals;
}
