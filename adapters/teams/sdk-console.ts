/**
 * @module sdk-console
 * The Bot Framework SDK logs with the global `console` (botbuilder 4.23 `cloudAdapter.js`,
 * botframework-connector `jwtTokenExtractor.js`: whole error objects, stack traces, the keys it
 * knows) and has no logger option. Calls the SDK makes inside `withSdkConsole` (tracked with
 * AsyncLocalStorage, so concurrent requests stay apart) go to the given sink as one short line
 * instead: the console method and the class of the first error-like argument, never its message
 * or stack. Calls made outside such a scope reach the console as before.
 */
import { AsyncLocalStorage } from "node:async_hooks";

export type SdkConsoleSink = (entry: { method: string; error: string }) => void;

const METHODS = ["error", "warn", "log", "info", "debug", "trace"] as const;
const scope = new AsyncLocalStorage<SdkConsoleSink>();
/** Our wrappers, so a console method replaced later (e.g. by a test's spy) is wrapped again. */
const wrappers = new WeakSet<object>();

function describe(args: readonly unknown[]): string {
  const error = args.find((a) => a instanceof Error);
  if (error instanceof Error) return error.name;
  return typeof args[0] === "string" ? "message" : typeof args[0];
}

function install(): void {
  for (const method of METHODS) {
    const original = console[method];
    if (wrappers.has(original)) continue;
    const wrapper = (...args: unknown[]) => {
      const sink = scope.getStore();
      if (sink === undefined) {
        original.apply(console, args);
        return;
      }
      sink({ method, error: describe(args) });
    };
    wrappers.add(wrapper);
    console[method] = wrapper;
  }
}

/** Runs `fn` with the SDK's console output sent to `sink`. */
export function withSdkConsole<T>(sink: SdkConsoleSink, fn: () => Promise<T>): Promise<T> {
  install();
  return scope.run(sink, fn);
}
