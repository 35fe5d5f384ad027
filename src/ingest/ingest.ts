/**
 * @module ingest
 * Idempotent ingestion (DESIGN.md §8): the delivery key is inserted with ON CONFLICT DO NOTHING
 * and the event's changes are applied only if the key was new, all in one transaction. The caller
 * acknowledges the platform only after `ingest` resolves; a thrown error (STORE_LOCKED,
 * STORE_FULL, STORE_UNAVAILABLE, …: a redelivery may succeed) means nothing of the event was
 * stored and it must not be acked. An event the store cannot apply for reasons of its own (e.g.
 * STORE_TOO_LARGE) is recorded as rejected — its delivery key's digest and the error code, no
 * content — and counts as seen, so one event never blocks the others.
 */
import { isPlumblineError, PlumblineError } from "../domain/errors.js";
import type { ChatEvent } from "../domain/events.js";
import type { Store, StoreTx } from "../ports/store.js";
import { applyEvent, eventMember } from "./apply-event.js";

/** Codes after which a redelivery may succeed: thrown, never recorded as rejected. */
const TRANSIENT = new Set([
  "STORE_LOCKED",
  "STORE_FULL",
  "STORE_UNAVAILABLE",
  "STORE_READ_ONLY",
  "STORE_TLS",
  "STORE_NO_ID_KEY",
  "STORE_KEY_MISMATCH",
]);

export interface IngestOptions {
  /** When the delivery arrived (epoch ms), for the 7-day dedupe window; default Date.now(). */
  readonly receivedAt?: number;
}

export interface Delivery {
  readonly event: ChatEvent;
  readonly deliveryKey: string;
}

export interface IngestResult {
  /** False when the key was seen before, or the event was rejected. */
  readonly applied: boolean;
  /** The error code when the event was recorded as rejected. */
  readonly rejected?: string;
}

/** The code an event's failure is recorded under, or null when it must be thrown (transient). */
function rejectionCode(error: unknown): string | null {
  if (isPlumblineError(error)) return TRANSIENT.has(error.code) ? null : error.code;
  return "STORE_REJECTED";
}

async function applyNew(store: Store, tx: StoreTx, delivery: Delivery, receivedAt: number) {
  const member = eventMember(delivery.event);
  const owner = {
    channel: delivery.event.channel,
    member: member === null ? null : store.memberKey(member),
  };
  if (!(await tx.addDelivery(delivery.deliveryKey, receivedAt, owner))) return false;
  await applyEvent({ tx, memberKey: (id) => store.memberKey(id) }, delivery.event);
  return true;
}

/** Applies one delivery once; `applied` is false when its key was seen before. */
export async function ingest(
  store: Store,
  event: ChatEvent,
  deliveryKey: string,
  options: IngestOptions = {},
): Promise<IngestResult> {
  const receivedAt = options.receivedAt ?? Date.now();
  try {
    return await store.transaction(async (tx) => ({
      applied: await applyNew(store, tx, { event, deliveryKey }, receivedAt),
    }));
  } catch (error) {
    const code = rejectionCode(error);
    if (code === null) throw error;
    // The event's own transaction rolled back; record the key as seen and the code, nothing else.
    const recorded = await store.transaction(async (tx) => {
      if (!(await tx.addDelivery(deliveryKey, receivedAt))) return false;
      await tx.addRejected(deliveryKey, code, receivedAt);
      return true;
    });
    return recorded ? { applied: false, rejected: code } : { applied: false };
  }
}

export interface IngestBatchOptions extends IngestOptions {
  /** Deliveries per transaction; default 500. */
  readonly batchSize?: number;
  /** Called after each committed batch with the running totals. */
  readonly onBatch?: (progress: IngestTotals) => void;
}

export interface IngestTotals {
  applied: number;
  skipped: number;
  /** Deliveries recorded as rejected, by error code. */
  rejected: Record<string, number>;
}

/**
 * Applies deliveries in order, `batchSize` per transaction (for imports). A failure rolls back only
 * the batch in progress; earlier batches stay committed and re-running the import skips them. A
 * batch that fails for one event's sake is replayed one event per transaction, so that event is
 * recorded as rejected and the others are applied. A transient failure is rethrown (STORE_FULL
 * then says how many events were committed before it).
 */
export async function ingestBatch(
  store: Store,
  deliveries: Iterable<Delivery> | AsyncIterable<Delivery>,
  options: IngestBatchOptions = {},
): Promise<IngestTotals> {
  const size = Math.max(1, Math.trunc(options.batchSize ?? 500));
  const totals: IngestTotals = { applied: 0, skipped: 0, rejected: {} };
  let pending: Delivery[] = [];
  const flush = async (): Promise<void> => {
    const batch = pending;
    pending = [];
    const receivedAt = options.receivedAt ?? Date.now();
    try {
      const applied = await store.transaction(async (tx) => {
        let count = 0;
        for (const delivery of batch) {
          if (await applyNew(store, tx, delivery, receivedAt)) count++;
        }
        return count;
      });
      totals.applied += applied;
      totals.skipped += batch.length - applied;
    } catch (error) {
      if (rejectionCode(error) === null) throw withProgress(error, totals);
      for (const delivery of batch) {
        let result: IngestResult;
        try {
          result = await ingest(store, delivery.event, delivery.deliveryKey, { receivedAt });
        } catch (inner) {
          throw withProgress(inner, totals);
        }
        if (result.rejected !== undefined) {
          totals.rejected[result.rejected] = (totals.rejected[result.rejected] ?? 0) + 1;
        } else if (result.applied) totals.applied++;
        else totals.skipped++;
      }
    }
    options.onBatch?.({ ...totals, rejected: { ...totals.rejected } });
  };
  for await (const delivery of deliveries) {
    pending.push(delivery);
    if (pending.length >= size) await flush();
  }
  if (pending.length > 0) await flush();
  return totals;
}

/** A transient error restated with what is already committed (re-running the import resumes). */
function withProgress(error: unknown, totals: IngestTotals): unknown {
  if (!isPlumblineError(error) || error.code !== "STORE_FULL") return error;
  const done = totals.applied + totals.skipped + sum(totals.rejected);
  return new PlumblineError(
    "STORE_FULL",
    `the database is full: ${done} event${done === 1 ? " was" : "s were"} committed before the failure (${totals.applied} applied), the batch in progress was not stored`,
    {
      hint: "free disk space (or raise the database's size limit) and run the same import again: committed events are skipped; `plumbline purge` drops old rows",
      cause: error,
    },
  );
}

export function sum(counts: Readonly<Record<string, number>>): number {
  return Object.values(counts).reduce((a, b) => a + b, 0);
}
