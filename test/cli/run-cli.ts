/** Runs the CLI's `main` in-process with captured output, as the CLI tests need it. */
import { main } from "../../adapters/local/cli.js";
import type { CliIo } from "../../adapters/local/cli-io.js";

export async function runCli(
  argv: readonly string[],
  env: Record<string, string | undefined> = {},
): Promise<{ code: number; out: string; err: string }> {
  let out = "";
  let err = "";
  const io: CliIo = {
    stdout: (t) => {
      out += t;
    },
    stderr: (t) => {
      err += t;
    },
    env,
    cwd: process.cwd(),
  };
  const code = await main(argv, io);
  return { code, out, err };
}
