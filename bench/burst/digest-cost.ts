/**
 * @module burst/digest-cost
 * What one digest's analyses cost at a given number of posterior draws, on channels of a kept
 * burst schema (`npm run bench:burst -- --seed-only --schema …`): for each `--samples` value, and
 * for each of the first `--take` channels (default 5, in channel order), the snapshot load and the
 * two analyses a digest runs (this week, and last week for the comparison; adapters/create-bot.ts
 * `composeDigest`), in this thread, timed in wall and CPU ms. Message building and posting are not
 * included (they do not depend on the draws). Run it inside the bench lock:
 * `flock /tmp/plumbline-bench.lock npx tsx bench/burst/digest-cost.ts --schema plumbline_burst_x
 * --samples 20,400`.
 */
import { createHash } from "node:crypto";
import { availableParallelism, loadavg } from "node:os";
import { inThreadRunner } from "../../src/analysis/analysis-job.js";
import { readChannelSettings } from "../../src/commands/channel-settings-store.js";
import { analysisSettingsFor } from "../../src/domain/channel-settings.js";
import { DAY_MS } from "../../src/domain/settings.js";
import { openStore } from "../../src/store/open-store.js";

function option(name: string, fallback: string): string {
  const i = process.argv.indexOf(`--${name}`);
  return i >= 0 && process.argv[i + 1] !== undefined ? process.argv[i + 1] : fallback;
}

const schema = option("schema", "");
if (!/^plumbline_burst_[a-z0-9_]+$/.test(schema)) {
  throw new Error("--schema plumbline_burst_NAME is required (a schema kept by --seed-only)");
}
const take = Number(option("take", "5"));
const samplesList = option("samples", "20,400").split(",").map(Number);
const url = process.env.DATABASE_URL ?? "";
if (!url.startsWith("postgres")) throw new Error("set DATABASE_URL=postgres://… (the bench's)");
/** Monday 30 November 2026, 09:00 UTC: the burst's slot (bench/burst/run.ts). */
const SLOT = Date.UTC(2026, 10, 30, 9, 0);
// The same id key as run.ts derives for a named schema.
const idKey = `burst-${createHash("sha256").update(schema).digest("hex").slice(0, 32)}`;

const store = await openStore(url, { idKey, schema });
try {
  const only = option("channel", "");
  const channels =
    only !== "" ? [only] : (await store.listChannels()).map((c) => c.channel).slice(0, take);
  console.log(
    `digest analyses on ${channels.length} channels of ${schema}; ${new Date().toISOString()}, ${availableParallelism()} cores, load ${loadavg()
      .map((l) => l.toFixed(2))
      .join(" ")}`,
  );
  console.log("draws | channel | members | wall ms | CPU ms");
  for (const samples of samplesList) {
    let wallSum = 0;
    let cpuSum = 0;
    for (const channel of channels) {
      const started = performance.now();
      const cpu = process.cpuUsage();
      const settings = await readChannelSettings(store, channel);
      const snapshot = await store.loadSnapshot(channel);
      const analysis = { ...analysisSettingsFor(settings), samples };
      const report = await inThreadRunner.run({
        kind: "analyze",
        snapshot,
        settings: analysis,
        until: SLOT,
      });
      await inThreadRunner.run({
        kind: "analyze",
        snapshot,
        settings: analysis,
        until: SLOT - 7 * DAY_MS,
      });
      const wall = performance.now() - started;
      const used = process.cpuUsage(cpu);
      const cpuMs = (used.user + used.system) / 1000;
      wallSum += wall;
      cpuSum += cpuMs;
      console.log(
        `${samples} | ${channel} | ${report.members} | ${wall.toFixed(0)} | ${cpuMs.toFixed(0)}`,
      );
    }
    console.log(
      `${samples} draws: mean ${(wallSum / channels.length).toFixed(0)} ms wall, ${(cpuSum / channels.length).toFixed(0)} ms CPU per digest`,
    );
  }
} finally {
  await store.close();
}
