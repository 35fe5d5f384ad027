/**
 * @module load-channel
 * Resolves an analysing command's source: a log path (positional), or `--db URL --channel C`
 * (the store the bot writes; member ids come back pseudonymised unless the member is `named`).
 */
import { resolve } from "node:path";
import { PlumblineError } from "../../src/domain/errors.js";
import type { LedgerSnapshot } from "../../src/domain/ledger.js";
import type { ParsedCommand } from "./cli-flags.js";
import type { CliIo } from "./cli-io.js";
import { loadLogChannel } from "./load-source.js";

export async function loadChannel(args: {
  parsed: ParsedCommand;
  io: CliIo;
  usage: string;
  until?: number;
}): Promise<{ snapshot: LedgerSnapshot; skipped: number }> {
  const { parsed, usage, io } = args;
  const channel = typeof parsed.values.channel === "string" ? parsed.values.channel : undefined;
  const [path, ...rest] = parsed.positionals;
  if (rest.length > 0 || (path !== undefined && parsed.values.db !== undefined)) {
    throw new PlumblineError("ARG_UNKNOWN", `give either a log or --db, not both`, {
      hint: `usage: ${usage}`,
    });
  }
  if (parsed.values.db !== undefined) {
    if (channel === undefined) {
      throw new PlumblineError("ARG_MISSING", "--db needs --channel", { hint: `usage: ${usage}` });
    }
    // The store's drivers (pg, better-sqlite3) load only when a command reads the store.
    const [{ openStore }, { databaseUrl, storeOptions }] = await Promise.all([
      import("../../src/store/open-store.js"),
      import("./cli-store.js"),
    ]);
    const store = await openStore(databaseUrl(parsed.values.db, io), storeOptions(io));
    try {
      const known = (await store.listChannels()).map((c) => c.channel);
      if (!known.includes(channel)) {
        throw new PlumblineError("ARG_BAD_VALUE", `channel "${channel}" is not in the store`, {
          hint: known.length
            ? `use one of: ${known.slice(0, 10).join(", ")}`
            : "import a log first: plumbline ingest <log> --db URL",
        });
      }
      return { snapshot: await store.loadSnapshot(channel), skipped: 0 };
    } finally {
      await store.close();
    }
  }
  if (path === undefined) {
    throw new PlumblineError("ARG_MISSING", "no log given", { hint: `usage: ${usage}` });
  }
  return loadLogChannel({
    path: resolve(io.cwd, path),
    skipBad: parsed.values["skip-bad"] === true,
    ...(channel === undefined ? {} : { channel }),
    ...(args.until === undefined ? {} : { until: args.until }),
  });
}
