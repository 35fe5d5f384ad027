/**
 * @module purge
 * The retention purge (DESIGN.md §7): ledger messages older than `retentionDays` (default 91) and
 * delivery keys received more than `dedupeDays` ago (default 7) are deleted. Consent and group
 * histories are kept: they decide consent for whatever is still stored. Run daily.
 */
import { PlumblineError } from "../domain/errors.js";
import { DAY_MS } from "../domain/settings.js";
import type { PurgeCounts, Store } from "../ports/store.js";

export const DEFAULT_RETENTION_DAYS = 91;
export const DEFAULT_DEDUPE_DAYS = 7;

export interface PurgeOptions {
  /** Epoch ms the ages are measured from. */
  readonly now: number;
  readonly retentionDays?: number;
  readonly dedupeDays?: number;
}

export function purge(store: Store, options: PurgeOptions): Promise<PurgeCounts> {
  const retention = options.retentionDays ?? DEFAULT_RETENTION_DAYS;
  const dedupe = options.dedupeDays ?? DEFAULT_DEDUPE_DAYS;
  for (const [name, value] of [
    ["retentionDays", retention],
    ["dedupeDays", dedupe],
  ] as const) {
    if (!Number.isFinite(value) || value < 0) {
      throw new PlumblineError(
        "ARG_BAD_VALUE",
        `${name} must be a number of days ≥ 0, got ${value}`,
        {
          hint: `give ${name} as a whole number of days, e.g. ${name === "dedupeDays" ? 7 : 91}`,
        },
      );
    }
  }
  return store.purge({
    ledgerBefore: options.now - retention * DAY_MS,
    deliveriesBefore: options.now - dedupe * DAY_MS,
  });
}
