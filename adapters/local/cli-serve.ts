/**
 * @module cli-serve
 * `plumbline serve`: runs the bot (adapters/serve.ts) until SIGTERM or SIGINT, then shuts down
 * in order: scheduler, platform adapters, HTTP server, store. A missing or malformed setting stops
 * it before anything starts, naming each one.
 */
import { PlumblineError } from "../../src/domain/errors.js";
import { serve } from "../serve.js";
import type { CliIo } from "./cli-io.js";

export async function runServe(argv: readonly string[], io: CliIo): Promise<number> {
  if (argv.length > 0) {
    throw new PlumblineError("ARG_UNKNOWN", `serve takes no arguments, got "${argv[0]}"`, {
      hint: "configure it with environment variables: see the README's settings table",
    });
  }
  const running = await serve({ env: io.env, cwd: io.cwd });
  io.stderr(
    `plumbline: serving on port ${running.port} (${running.adapters.map((a) => a.name).join(", ")}); stop with Ctrl-C\n`,
  );
  await new Promise<void>((resolve) => {
    const stop = () => resolve();
    process.once("SIGTERM", stop);
    process.once("SIGINT", stop);
  });
  await running.close();
  return 0;
}
