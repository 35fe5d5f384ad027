/**
 * @module burst/run
 * `npm run bench:burst`: the Monday-morning burst (issue 17). N channels (default 1,000) of 20–200
 * invented members each, with four weeks of seeded activity (bench/synthetic-channel.ts, three
 * messages per member; `--patterns` of them ingested, the rest SQL copies), all with the default
 * digest (Monday 09:00 UTC), are stored in one PostgreSQL database under a schema of this run's
 * own. Then, for 1, 2 and 3 replica processes and
 * once more with 3 where one is SIGKILLed when half the digests are out, every replica starts at
 * simulated Monday 09:00:30 and the run ends when every channel's claim is final. Slack is faked on
 * loopback with its per-channel and workspace pacing (429 + Retry-After). Prints one table: time
 * until the last digest, posts per (channel, period), misses with their reasons, each replica's
 * share of posts, peak RSS, SQL statements per digest, and for the kill run how long the takeover
 * took.
 *
 * Options: --channels N (default 1000), --lease S (claim lease in seconds, default 20),
 * --cap S (time cap for all runs together, default 1500), --runs 1,2,3,3k (default all),
 * --samples K (posterior draws per analysis in the replicas, default 40; the product's 400 costs
 * seconds per digest here), --workspace-per-minute N (the fake's workspace-wide post cap,
 * default 300: Slack documents a workspace-wide limit for chat.postMessage without a figure, so
 * the value is an assumption). A run is done when every channel's claim is final or its digest
 * keeps failing to compose (listed with the error: a stuck job is reported, not waited for).
 * --patterns P (default 50): that many channels are seeded through ingestion, the others are
 * SQL copies of them (channel i has pattern i mod P), since ingesting 1,000 channels takes more
 * than an hour on this machine.
 * --workers N (analysis threads per replica, 0: in the replica's thread; default the machine's
 * parallelism, as `serve`), --jobs N (the scheduler's channels at once; default as many as
 * workers, 1 with none). --schema plumbline_burst_NAME names the schema (and
 * fixes the store's id key by it); --seed-only seeds it and keeps it; --reuse runs on a kept one
 * without seeding (so each run can be its own invocation inside the bench lock); --keep keeps it.
 * A second table says where each run's time went (CPU of replicas, their PostgreSQL backends and
 * the bench; waits per digest).
 * The schema is dropped at the end, also after a failure or Ctrl-C, unless kept.
 */
import { type ChildProcess, execFileSync, spawn } from "node:child_process";
import { createHash, randomBytes } from "node:crypto";
import { readFileSync } from "node:fs";
import { availableParallelism, loadavg } from "node:os";
import { dirname, join } from "node:path";
import { fileURLToPath } from "node:url";
import pg from "pg";
import { coreChannelId, parseCoreChannelId } from "../../adapters/slack/channel-ids.js";
import { writeChannelSettings } from "../../src/commands/channel-settings-store.js";
import { DEFAULT_CHANNEL_SETTINGS } from "../../src/domain/channel-settings.js";
import { DAY_MS } from "../../src/domain/settings.js";
import { ingestBatch } from "../../src/ingest/ingest.js";
import { createSeededRng } from "../../src/ports/rng.js";
import { openStore } from "../../src/store/open-store.js";
import { syntheticChannel } from "../synthetic-channel.js";
import { type FakeSlack, startFakeSlack } from "./fake-slack.js";

const here = dirname(fileURLToPath(import.meta.url));
const PG_URL = process.env.DATABASE_URL?.startsWith("postgres")
  ? process.env.DATABASE_URL
  : "postgres://postgres@127.0.0.1:5432/test";
const TEAM = "T0BURST";
/** Monday 30 November 2026, 09:00:30 UTC: every default digest fell due 30 s ago. */
const BASE = Date.UTC(2026, 10, 30, 9, 0, 30);
const PERIOD = "2026-11-30T09:00[UTC]";

function option(name: string, fallback: string): string {
  const i = process.argv.indexOf(`--${name}`);
  return i >= 0 && process.argv[i + 1] !== undefined ? process.argv[i + 1] : fallback;
}

const channelsWanted = Number(option("channels", "1000"));
const leaseMs = Number(option("lease", "20")) * 1000;
const capMs = Number(option("cap", "1500")) * 1000;
const runsWanted = option("runs", "1,2,3,3k").split(",");
const samples = Number(option("samples", "40"));
const templates = Number(option("patterns", "50"));
const workspacePerMinute = Number(option("workspace-per-minute", "300"));
/**
 * Worker threads per replica (0: analyses in the replica's own thread) and scheduler jobs; by
 * default as `serve` runs: a pool of availableParallelism() workers and as many jobs.
 */
const workers = Number(option("workers", String(availableParallelism())));
const jobs = Number(option("jobs", String(Math.max(1, workers))));
if (!(Number.isInteger(workers) && workers >= 0 && Number.isInteger(jobs) && jobs >= 1)) {
  throw new Error("--workers must be a whole number ≥ 0 and --jobs ≥ 1");
}
if (
  !(Number.isInteger(channelsWanted) && channelsWanted > 0 && leaseMs > 0 && capMs > 0) ||
  !(Number.isInteger(samples) && samples >= 0 && workspacePerMinute > 0)
) {
  throw new Error(
    "--channels, --lease, --cap and --workspace-per-minute must be positive, --samples ≥ 0",
  );
}
const namedSchema = option("schema", "");
const reuse = process.argv.includes("--reuse");
const seedOnly = process.argv.includes("--seed-only");
const keep = reuse || seedOnly || process.argv.includes("--keep");
if (namedSchema !== "" && !/^plumbline_burst_[a-z0-9_]+$/.test(namedSchema)) {
  throw new Error("--schema must look like plumbline_burst_NAME (lower-case letters, digits, _)");
}
if ((reuse || seedOnly) && namedSchema === "") {
  throw new Error("--reuse and --seed-only need --schema plumbline_burst_NAME");
}
const schema =
  namedSchema !== ""
    ? namedSchema
    : `plumbline_burst_${process.pid}_${randomBytes(3).toString("hex")}`;
/** The store's id key: fixed by a named schema, so a later --reuse reads the same member keys. */
const ID_KEY =
  namedSchema !== ""
    ? `burst-${createHash("sha256").update(namedSchema).digest("hex").slice(0, 32)}`
    : `burst-${randomBytes(16).toString("hex")}`;
const benchStart = Date.now();

interface ReplicaStatus {
  replica: string;
  ready?: boolean;
  maxRssKb: number;
  statements: number;
  sqlMs: number;
  analysisMs: number;
  slackMs: number;
  cpuMs: number;
  posted: number;
  /** Channel → error of its last failed compose or post. */
  failing?: Record<string, string>;
}

interface RunResult {
  label: string;
  replicas: number;
  complete: boolean;
  firstDigestS: number;
  lastDigestS: number;
  postsMin: number;
  postsMax: number;
  doubles: number;
  zeros: number;
  misses: string;
  shares: string;
  maxShare: number;
  rssMb: string;
  statementsPerDigest: number;
  refused: number;
  stuck: string;
  takeover: string;
  /** Where the time went (per digest posted unless said otherwise). */
  cost: {
    wallS: number;
    replicaCpuS: string;
    replicaCpuPerDigestMs: number;
    replicaCores: number;
    machineBusy: number;
    pgCpuPerDigestMs: number;
    benchCpuPerDigestMs: number;
    analysisPerDigestMs: number;
    sqlPerDigestMs: number;
    slackPerDigestMs: number;
  };
}

/** Jiffies per second for /proc (getconf CLK_TCK; 100 on Linux almost everywhere). */
const CLK_TCK = (() => {
  try {
    return Number(execFileSync("getconf", ["CLK_TCK"]).toString().trim()) || 100;
  } catch {
    return 100;
  }
})();

/** The machine's CPU jiffies (all cores) from /proc/stat: busy and total. */
function machineCpu(): { busy: number; total: number } {
  const fields = readFileSync("/proc/stat", "utf8").split("\n")[0].trim().split(/\s+/).slice(1);
  const values = fields.map(Number);
  const idle = values[3] + (values[4] ?? 0); // idle + iowait
  const total = values.slice(0, 8).reduce((a, b) => a + b, 0); // without guest (counted in user)
  return { busy: total - idle, total };
}

/** utime + stime of a process in ms, or null when it is gone. */
function processCpuMs(pid: number): number | null {
  try {
    const stat = readFileSync(`/proc/${pid}/stat`, "utf8");
    const rest = stat.slice(stat.lastIndexOf(")") + 2).split(" ");
    return ((Number(rest[11]) + Number(rest[12])) * 1000) / CLK_TCK;
  } catch {
    return null;
  }
}

/**
 * CPU used by the PostgreSQL backends of the replicas' connections (application_name burst-rN), sampled
 * on each poll from pg_stat_activity and /proc: a backend's last sample counts, less its CPU at
 * the start of the run. The last < 250 ms of a backend that closes between polls is not counted.
 */
class BackendCpu {
  private readonly start = new Map<number, number>();
  private readonly last = new Map<number, number>();
  constructor(private readonly monitor: pg.Client) {}
  async sample(first = false): Promise<void> {
    const { rows } = await this.monitor.query<{ pid: number }>(
      "SELECT pid FROM pg_stat_activity WHERE datname = current_database() AND application_name LIKE 'burst-r%'",
    );
    for (const { pid } of rows) {
      const ms = processCpuMs(pid);
      if (ms === null) continue;
      if (!this.start.has(pid)) this.start.set(pid, first ? ms : 0);
      this.last.set(pid, ms);
    }
  }
  totalMs(): number {
    let sum = 0;
    for (const [pid, ms] of this.last) sum += ms - (this.start.get(pid) ?? 0);
    return sum;
  }
}

async function seed(channels: string[]): Promise<void> {
  const store = await openStore(PG_URL, { idKey: ID_KEY, schema, createSchema: true });
  const patterns = channels.slice(0, Math.min(templates, channels.length));
  let events = 0;
  try {
    const rng = createSeededRng(17);
    for (const [i, channel] of patterns.entries()) {
      const members = 20 + Math.floor(rng.next() * 181);
      const synthetic = syntheticChannel({
        members,
        messages: 3 * members,
        seed: 1000 + i,
        channel,
        start: BASE - 28 * DAY_MS - 30_000,
        days: 28,
      });
      await store.registerChannel(channel, TEAM);
      await ingestBatch(
        store,
        synthetic.events.map((event, k) => ({ event, deliveryKey: `${channel}/${k}` })),
        { batchSize: 2000, receivedAt: BASE - DAY_MS },
      );
      // Notes off: the burst is about digests (notes are evaluated hourly, not all at once).
      await writeChannelSettings(store, channel, { ...DEFAULT_CHANNEL_SETTINGS, notes: "off" });
      events += synthetic.events.length;
    }
  } finally {
    await store.close();
  }
  await cloneChannels(channels, patterns);
  console.log(
    `seeded ${patterns.length} channels through ingestion (${events} events) and copied them to ${channels.length} channels, schema ${schema}`,
  );
}

/**
 * Fills the other channels with copies of the seeded ones' rows (channel i gets pattern
 * i mod patterns), in SQL: ingesting 1,000 channels one event at a time takes over an hour on
 * this machine. Member keys do not depend on the channel, so a copy is a channel of its own to
 * every query; delivery keys get the copy's channel as prefix. Claims are not copied.
 */
async function cloneChannels(channels: string[], patterns: string[]): Promise<void> {
  const copies = channels.slice(patterns.length);
  if (copies.length === 0) return;
  const client = new pg.Client({ connectionString: PG_URL });
  await client.connect();
  try {
    await client.query(`SET search_path TO ${schema}`);
    await client.query("CREATE TEMP TABLE burst_copy (template TEXT NOT NULL, copy TEXT NOT NULL)");
    await client.query("INSERT INTO burst_copy SELECT * FROM unnest($1::text[], $2::text[])", [
      copies.map((_, i) => patterns[(patterns.length + i) % patterns.length]),
      copies,
    ]);
    const { rows } = await client.query<{ table_name: string; columns: string[] }>(
      `SELECT table_name, array_agg(column_name::text ORDER BY ordinal_position) AS columns
       FROM information_schema.columns WHERE table_schema = $1 GROUP BY table_name`,
      [schema],
    );
    for (const { table_name: table, columns } of rows) {
      if (table === "post_claim" || !columns.includes("channel")) continue;
      const kept = columns.filter((c) => c !== "seq");
      const values = kept.map((c) =>
        c === "channel"
          ? "m.copy"
          : c === "delivery_key"
            ? "m.copy || '/' || t.delivery_key"
            : `t.${c}`,
      );
      // Ordered by seq where there is one, so copied change logs keep their applied order.
      const order = columns.includes("seq") ? " ORDER BY m.copy, t.seq" : "";
      await client.query(
        `INSERT INTO ${table} (${kept.join(", ")}) SELECT ${values.join(", ")}
         FROM ${table} t JOIN burst_copy m ON t.channel = m.template${order}`,
      );
    }
    await client.query("ANALYZE");
  } finally {
    await client.end();
  }
}

async function query<T extends pg.QueryResultRow>(sql: string, params: unknown[] = []) {
  const client = new pg.Client({ connectionString: PG_URL });
  await client.connect();
  try {
    await client.query(`SET search_path TO ${schema}`);
    return (await client.query<T>(sql, params)).rows;
  } finally {
    await client.end();
  }
}

function startReplica(id: string, slackUrl: string, statuses: Map<string, ReplicaStatus>) {
  const child = spawn(process.execPath, ["--import", "tsx", join(here, "replica.ts")], {
    env: {
      ...process.env,
      // Named, so the bench counts the CPU of this replica's PostgreSQL backends and no others.
      DATABASE_URL: `${PG_URL}${PG_URL.includes("?") ? "&" : "?"}application_name=burst-${id}`,
      BURST_SCHEMA: schema,
      BURST_REPLICA: id,
      BURST_LEASE_MS: String(leaseMs),
      BURST_SLACK_URL: slackUrl,
      BURST_BASE: String(BASE),
      BURST_ID_KEY: ID_KEY,
      BURST_SAMPLES: String(samples),
      BURST_WORKERS: String(workers),
      BURST_JOBS: String(jobs),
    },
    stdio: ["pipe", "pipe", "inherit"],
  });
  let buffered = "";
  child.stdout?.on("data", (chunk: Buffer) => {
    buffered += chunk.toString("utf8");
    const lines = buffered.split("\n");
    buffered = lines.pop() ?? "";
    for (const line of lines) {
      try {
        const s = JSON.parse(line) as ReplicaStatus;
        statuses.set(s.replica, s);
      } catch {
        // not a status line
      }
    }
  });
  return child;
}

/** The commit the bench started from (read at start: commits made during a run do not count). */
const startCommit = (() => {
  try {
    const head = execFileSync("git", ["rev-parse", "--short", "HEAD"], { cwd: here })
      .toString()
      .trim();
    const dirty = execFileSync("git", ["status", "--porcelain", "--untracked-files=no"], {
      cwd: here,
    })
      .toString()
      .trim();
    return dirty === "" ? head : `${head} + uncommitted changes`;
  } catch {
    return "unknown";
  }
})();

const sleep = (ms: number) => new Promise((resolve) => setTimeout(resolve, ms));

function exited(child: ChildProcess): Promise<void> {
  if (child.exitCode !== null || child.signalCode !== null) return Promise.resolve();
  return new Promise((resolve) => child.once("exit", () => resolve()));
}

async function runOnce(
  label: string,
  replicas: number,
  kill: boolean,
  channels: string[],
  slack: FakeSlack,
): Promise<RunResult> {
  await query("DELETE FROM post_claim");
  slack.reset();
  const statuses = new Map<string, ReplicaStatus>();
  const ids = Array.from({ length: replicas }, (_, i) => `r${i + 1}`);
  const children = ids.map((id) => startReplica(id, slack.url, statuses));
  // Every replica up and connected before the due minute, as in production; then all go at once.
  while (ids.some((id) => statuses.get(id) === undefined) && Date.now() < benchStart + capMs) {
    await sleep(100);
  }
  const monitor = new pg.Client({ connectionString: PG_URL });
  await monitor.connect();
  await monitor.query(`SET search_path TO ${schema}`);
  const backends = new BackendCpu(monitor);
  await backends.sample(true);
  const machineAtGo = machineCpu();
  const benchCpuAtGo = process.cpuUsage();
  const t0 = Date.now();
  for (const child of children) child.stdin?.end("go\n");
  let killAt: number | null = null;
  let orphaned: string[] = [];
  let leaseEnd = 0;
  let complete = false;
  const deadline = benchStart + capMs;
  let stuck = new Map<string, string>();
  while (Date.now() < deadline) {
    await sleep(kill && killAt === null ? 20 : 250);
    await backends.sample();
    const { rows: finalRows } = await monitor.query<{ channel: string }>(
      "SELECT channel FROM post_claim WHERE kind = 'digest' AND period = $1 AND status IN ('posted', 'missed')",
      [PERIOD],
    );
    const finals = new Set(finalRows.map((r) => r.channel));
    stuck = new Map(
      [...statuses.values()]
        .flatMap((s) => Object.entries(s.failing ?? {}))
        .filter(([channel]) => !finals.has(channel)),
    );
    const final = finals.size;
    if (kill && killAt === null && final >= channels.length / 2) {
      // Half-way, and at a moment the victim holds a job (composing or posting): SIGKILL it.
      const { rows: held } = await monitor.query<{ channel: string }>(
        "SELECT channel FROM post_claim WHERE claimed_by = $1 AND status IN ('claimed', 'posting')",
        [ids[1]],
      );
      if (held.length > 0) {
        children[1].kill("SIGKILL");
        killAt = Date.now();
        const after = await query<{ channel: string; lease_until: string }>(
          "SELECT channel, lease_until FROM post_claim WHERE claimed_by = $1 AND status IN ('claimed', 'posting')",
          [ids[1]],
        );
        orphaned = after.map((h) => h.channel);
        // The replicas' clock is BASE + real time since "go", so a lease ends at t0 + (until − BASE).
        leaseEnd = Math.max(0, ...after.map((h) => t0 + (Number(h.lease_until) - BASE)));
      }
    }
    if (final + stuck.size >= channels.length) {
      complete = true;
      break;
    }
  }
  const wallMs = Date.now() - t0;
  const machineAtEnd = machineCpu();
  const benchCpu = process.cpuUsage(benchCpuAtGo);
  await backends.sample();
  await monitor.end();
  for (const child of children) if (child.exitCode === null) child.kill("SIGTERM");
  await Promise.race([Promise.all(children.map(exited)), sleep(10_000)]);
  for (const child of children) if (child.exitCode === null) child.kill("SIGKILL");

  const counts = channels.map(
    (c) => slack.posts.get(parseCoreChannelId(c)?.channel ?? "")?.length ?? 0,
  );
  const allTimes = [...slack.posts.values()].flat();
  const lastPost = allTimes.length > 0 ? Math.max(...allTimes) : t0;
  const byReplica = await query<{ claimed_by: string; n: string }>(
    "SELECT claimed_by, count(*) AS n FROM post_claim WHERE kind = 'digest' AND status = 'posted' GROUP BY claimed_by ORDER BY claimed_by",
  );
  const missRows = await query<{ platform_message_id: string; n: string }>(
    "SELECT platform_message_id, count(*) AS n FROM post_claim WHERE status = 'missed' GROUP BY platform_message_id",
  );
  const postedTotal = byReplica.reduce((s, r) => s + Number(r.n), 0);
  const shares = byReplica.map((r) => ({ id: r.claimed_by, share: Number(r.n) / postedTotal }));
  const statements = [...statuses.values()].reduce((s, r) => s + r.statements, 0);
  const sum = (field: "cpuMs" | "sqlMs" | "analysisMs" | "slackMs") =>
    [...statuses.values()].reduce((s, r) => s + (r[field] ?? 0), 0);
  const digests = Math.max(1, postedTotal);
  const cost = {
    wallS: wallMs / 1000,
    replicaCpuS: ids.map((id) => ((statuses.get(id)?.cpuMs ?? 0) / 1000).toFixed(0)).join("/"),
    replicaCpuPerDigestMs: sum("cpuMs") / digests,
    replicaCores: sum("cpuMs") / wallMs,
    machineBusy: (machineAtEnd.busy - machineAtGo.busy) / (machineAtEnd.total - machineAtGo.total),
    pgCpuPerDigestMs: backends.totalMs() / digests,
    benchCpuPerDigestMs: (benchCpu.user + benchCpu.system) / 1000 / digests,
    analysisPerDigestMs: sum("analysisMs") / digests,
    sqlPerDigestMs: sum("sqlMs") / digests,
    slackPerDigestMs: sum("slackMs") / digests,
  };
  let takeover = "";
  if (kill) {
    if (killAt === null) {
      takeover = "not killed";
    } else {
      const rows = orphaned.length
        ? await query<{ channel: string; status: string; claimed_by: string }>(
            "SELECT channel, status, claimed_by FROM post_claim WHERE channel = ANY($1)",
            [orphaned],
          )
        : [];
      const times = rows
        .map((r) => slack.posts.get(parseCoreChannelId(r.channel)?.channel ?? "")?.[0] ?? null)
        .filter((t): t is number => t !== null && t >= (killAt ?? 0));
      const lastTakeover = times.length > 0 ? (Math.max(...times) - killAt) / 1000 : 0;
      const takenBy = rows.filter((r) => r.status === "posted" && r.claimed_by !== ids[1]).length;
      const afterLease =
        times.length > 0 ? ((Math.max(...times) - leaseEnd) / 1000).toFixed(1) : "–";
      takeover = `${orphaned.length} held at kill: ${takenBy} posted by others, last ${lastTakeover.toFixed(1)} s after kill, ${afterLease} s after the dead replica's lease ended (lease ${leaseMs / 1000} s); ${rows.filter((r) => r.status === "missed").length} missed`;
    }
  }
  return {
    label,
    replicas,
    complete,
    firstDigestS: ((allTimes.length > 0 ? Math.min(...allTimes) : t0) - t0) / 1000,
    lastDigestS: (lastPost - t0) / 1000,
    postsMin: Math.min(...counts),
    postsMax: Math.max(...counts),
    doubles: counts.filter((n) => n > 1).length,
    zeros: counts.filter((n) => n === 0).length,
    misses:
      missRows
        .map((m) => `${m.n} ${m.platform_message_id.replace(/^\(missed: |\)$/g, "")}`)
        .join(", ") || "none",
    shares: shares.map((s) => `${s.id} ${(100 * s.share).toFixed(0)}%`).join(" "),
    maxShare: Math.max(0, ...shares.map((s) => s.share)),
    rssMb: ids.map((id) => `${((statuses.get(id)?.maxRssKb ?? 0) / 1024).toFixed(0)}`).join("/"),
    statementsPerDigest: statements / channels.length,
    refused: slack.refused(),
    stuck: stuckSummary(stuck),
    takeover,
    cost,
  };
}

/** "3 RangeError" style counts of the channels whose digest kept failing, by error. */
function stuckSummary(stuck: Map<string, string>): string {
  const byError = new Map<string, number>();
  for (const error of stuck.values()) byError.set(error, (byError.get(error) ?? 0) + 1);
  return [...byError].map(([error, n]) => `${n} ${error}`).join(", ") || "none";
}

function table(results: RunResult[]): string {
  const head = [
    "run",
    "done",
    "first digest s",
    "last digest s",
    "posts/channel min–max",
    "doubles",
    "no post",
    "misses (reason)",
    "compose failing",
    "share of posts",
    "peak RSS MB",
    "SQL/digest",
    "429s",
  ];
  const rows = results.map((r) => [
    r.label,
    r.complete ? "yes" : "CAP",
    r.firstDigestS.toFixed(1),
    r.lastDigestS.toFixed(1),
    `${r.postsMin}–${r.postsMax}`,
    String(r.doubles),
    String(r.zeros),
    r.misses,
    r.stuck,
    r.shares,
    r.rssMb,
    r.statementsPerDigest.toFixed(1),
    String(r.refused),
  ]);
  const widths = head.map((h, i) => Math.max(h.length, ...rows.map((row) => row[i].length)));
  const line = (cells: string[]) => cells.map((c, i) => c.padEnd(widths[i])).join(" | ");
  return [line(head), widths.map((w) => "-".repeat(w)).join("-|-"), ...rows.map(line)].join("\n");
}

/** Where each run's time went: CPU of replicas, PostgreSQL and the bench, and waits per digest. */
function costTable(results: RunResult[]): string {
  const head = [
    "run",
    "wall s",
    "replica CPU s",
    "replica CPU ms/digest",
    "replicas' cores busy",
    "machine busy %",
    "PostgreSQL CPU ms/digest",
    "bench+fake CPU ms/digest",
    "in analysis ms/digest",
    "awaiting SQL ms/digest",
    "awaiting Slack ms/digest",
  ];
  const rows = results.map((r) => [
    r.label,
    r.cost.wallS.toFixed(1),
    r.cost.replicaCpuS,
    r.cost.replicaCpuPerDigestMs.toFixed(0),
    r.cost.replicaCores.toFixed(2),
    (100 * r.cost.machineBusy).toFixed(0),
    r.cost.pgCpuPerDigestMs.toFixed(0),
    r.cost.benchCpuPerDigestMs.toFixed(0),
    r.cost.analysisPerDigestMs.toFixed(0),
    r.cost.sqlPerDigestMs.toFixed(0),
    r.cost.slackPerDigestMs.toFixed(0),
  ]);
  const widths = head.map((h, i) => Math.max(h.length, ...rows.map((row) => row[i].length)));
  const line = (cells: string[]) => cells.map((c, i) => c.padEnd(widths[i])).join(" | ");
  return [line(head), widths.map((w) => "-".repeat(w)).join("-|-"), ...rows.map(line)].join("\n");
}

/** With --reuse: the kept schema must hold exactly the channels asked for. */
async function checkReused(channels: string[]): Promise<void> {
  const rows = await query<{ n: string }>("SELECT count(*) AS n FROM channel").catch(() => {
    throw new Error(`--reuse: schema ${schema} is missing; seed it first with --seed-only`);
  });
  const n = Number(rows[0]?.n ?? 0);
  if (n !== channels.length) {
    throw new Error(
      `--reuse: schema ${schema} holds ${n} channels, not --channels ${channels.length}; pass --channels ${n}`,
    );
  }
  console.log(`reusing schema ${schema} (${n} channels)`);
}

async function main(): Promise<void> {
  const channels = Array.from({ length: channelsWanted }, (_, i) =>
    coreChannelId(TEAM, `C${i.toString(36).toUpperCase().padStart(6, "0")}`),
  );
  const slack = await startFakeSlack({ minIntervalMs: 1000, workspacePerMinute });
  try {
    if (reuse) await checkReused(channels);
    else await seed(channels);
    if (seedOnly) {
      console.log(`kept schema ${schema}: run with --schema ${schema} --reuse`);
      return;
    }
    const results: RunResult[] = [];
    const plan: [string, number, boolean][] = [
      ["1", 1, false],
      ["2", 2, false],
      ["3", 3, false],
      ["3k", 3, true],
    ];
    // In the order --runs names them (so the runs that matter most can go first under a cap).
    const ordered = runsWanted.flatMap((key) => plan.filter((p) => p[0] === key));
    for (const [, replicas, kill] of ordered) {
      if (Date.now() >= benchStart + capMs) break;
      const label = kill ? `${replicas} replicas, one SIGKILLed` : `${replicas} replica(s)`;
      const result = await runOnce(label, replicas, kill, channels, slack);
      results.push(result);
      console.log(`${label}: last digest after ${result.lastDigestS.toFixed(1)} s`);
    }
    console.log("");
    console.log(
      `Burst: ${channels.length} channels, digests due Monday 09:00 UTC, lease ${leaseMs / 1000} s, ${samples} draws per analysis (the product's default: 400), ${workers === 0 ? "analyses in each replica's own thread" : `${workers} analysis worker(s) per replica`}, ${jobs} scheduler job(s) at once per replica, Slack faked at 1 post/s per channel and ${workspacePerMinute} posts/min per workspace`,
    );
    console.log(
      `${new Date().toISOString()}, commit ${startCommit}, ${availableParallelism()} cores, load average at the end ${loadavg()
        .map((l) => l.toFixed(2))
        .join(" ")}`,
    );
    console.log(table(results));
    console.log("");
    console.log(costTable(results));
    const one = results.find((r) => r.label.startsWith("1 "));
    const three = results.find((r) => r.label === "3 replica(s)");
    if (one && three) {
      console.log(
        `3 replicas / 1 replica time: ${(three.lastDigestS / one.lastDigestS).toFixed(2)} (target ≤ 0.5); largest share with 3: ${(100 * three.maxShare).toFixed(0)}% (target ≤ 50%)`,
      );
    }
    for (const r of results) if (r.takeover) console.log(`takeover: ${r.takeover}`);
    const bad = results.filter((r) => r.doubles > 0 || !r.complete);
    console.log(
      bad.length === 0
        ? "no channel was posted twice; every claim is final"
        : `PROBLEM in: ${bad.map((r) => r.label).join(", ")}`,
    );
  } finally {
    await slack.close();
    if (!keep) await dropSchema();
  }
}

async function dropSchema(): Promise<void> {
  const client = new pg.Client({ connectionString: PG_URL });
  await client.connect();
  await client.query(`DROP SCHEMA IF EXISTS ${schema} CASCADE`);
  await client.end();
}

process.on("SIGINT", () => {
  if (keep) process.exit(130);
  const client = new pg.Client({ connectionString: PG_URL });
  client
    .connect()
    .then(() => client.query(`DROP SCHEMA IF EXISTS ${schema} CASCADE`))
    .finally(() => process.exit(130));
});

await main();
