/** A store whose transactions fail on chosen message ids, for tests of what a refused write keeps. */
import type { Store, StoreTx } from "../../src/ports/store.js";

/** The store, with `insertMessage` throwing `failure()` for the message ids in `poison`. */
export function failingInserts(
  store: Store,
  poison: ReadonlySet<string>,
  failure: () => unknown,
): Store {
  return new Proxy(store, {
    get(target, prop, receiver) {
      if (prop === "transaction") {
        return <T>(fn: (tx: StoreTx) => Promise<T>) =>
          target.transaction((tx) =>
            fn({
              ...tx,
              insertMessage: async (channel, message) => {
                if (poison.has(message.id)) throw failure();
                return tx.insertMessage(channel, message);
              },
            }),
          );
      }
      const value = Reflect.get(target, prop, receiver);
      return typeof value === "function" ? value.bind(target) : value;
    },
  });
}
