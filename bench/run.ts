/**
 * @module run
 * Entry of `npm run bench` (never part of `npm test`): runs the engine, end-to-end peer (numpy/scipy,
 * bench/peer-bench.ts), ingest and Slack benches (`npm run bench -- peer` runs one section),
 * prints one table per bench and a final summary line `bench: N targets met, M missed`. The ingest
 * and Slack rows get their targets here (from the issues: ≥ 5,000 events/s single-event SQLite
 * ingest, ≥ 1,000 signed Slack events/s over loopback with no non-2xx and counted = distinct).
 * A missed target is printed as MISSED but never changes the exit code, since timings depend on
 * the machine and its load (printed in the header so readers can judge the figures).
 */
import { availableParallelism, cpus, loadavg } from "node:os";
import { type BenchRow, benchEngine } from "./engine-bench.js";
import { benchIngest } from "./ingest-bench.js";
import { benchPeer } from "./peer-bench.js";
import { benchSlack } from "./slack-bench.js";

type TableRow = BenchRow;

/** Narrows one row handed over by another bench module (`{ name, value, unit, note? }`). */
function asRow(value: unknown): TableRow | null {
  if (typeof value !== "object" || value === null) return null;
  const r = value as Record<string, unknown>;
  if (typeof r.name !== "string" || typeof r.value !== "number" || typeof r.unit !== "string") {
    return null;
  }
  const note = typeof r.note === "string" ? r.note : undefined;
  // A row counts as a target when it says so: `met: boolean`, or a note that starts PASS/MISSED.
  let met = typeof r.met === "boolean" ? r.met : undefined;
  if (met === undefined && note !== undefined && /^(PASS|MISSED)\b/.test(note)) {
    met = note.startsWith("PASS");
  }
  return {
    name: r.name,
    value: r.value,
    unit: r.unit,
    ...(typeof r.target === "string" ? { target: r.target } : {}),
    ...(met !== undefined ? { met } : {}),
    ...(note !== undefined ? { note } : {}),
  };
}

function formatValue(value: number): string {
  if (!Number.isFinite(value)) return String(value);
  const size = Math.abs(value);
  if (size === 0) return "0";
  if (size >= 1000) return value.toFixed(0);
  if (size >= 1) return value.toFixed(2);
  if (size >= 1e-3) return value.toFixed(4);
  return value.toExponential(2);
}

function status(row: TableRow): string {
  if (row.met === undefined) return "";
  return row.met ? "PASS" : "MISSED";
}

function printTable(title: string, rows: readonly TableRow[]): void {
  const header = ["name", "value", "unit", "target", "status", "note"];
  const cells = rows.map((row) => [
    row.name,
    formatValue(row.value),
    row.unit,
    row.target ?? "",
    status(row),
    row.note ?? "",
  ]);
  const widths = header.map((h, c) => Math.max(h.length, ...cells.map((line) => line[c].length)));
  const line = (parts: readonly string[]) =>
    parts
      .map((part, c) => (c === 1 ? part.padStart(widths[c]) : part.padEnd(widths[c])))
      .join("  ")
      .trimEnd();
  console.log(`\n${title}`);
  console.log(line(header));
  console.log(line(widths.map((w) => "-".repeat(w))));
  for (const parts of cells) console.log(line(parts));
}

/** Targets for rows of the other benches, by row name: [target text, test]. */
const TARGETS: Record<string, [string, (value: number) => boolean]> = {
  "ingest sqlite single (synchronous NORMAL)": ["≥ 5000", (v) => v >= 5000],
  "slack http ingest (sqlite)": ["≥ 1000", (v) => v >= 1000],
  "slack http non-2xx": ["= 0", (v) => v === 0],
  "slack counted - distinct": ["= 0", (v) => v === 0],
};

function withTargets(rows: readonly unknown[], source: string): TableRow[] {
  return rows.map((value, i) => {
    const row = asRow(value);
    if (row === null) throw new Error(`${source} row ${i} lacks name, value or unit`);
    const target = TARGETS[row.name];
    return target ? { ...row, target: target[0], met: target[1](row.value) } : row;
  });
}

async function main(): Promise<void> {
  const [load1] = loadavg();
  console.log(
    `plumbline bench — node ${process.version}, ${cpus()[0]?.model ?? "cpu"} × ${availableParallelism()}, load average ${load1.toFixed(2)} at start`,
  );
  // `npm run bench -- peer engine` runs only the named sections; no names run all of them.
  const wanted = new Set(process.argv.slice(2));
  const sections: [string, string, () => Promise<readonly unknown[]>][] = [
    ["engine", "engine (medians after warm-up; ms unless noted)", benchEngine],
    ["peer", "end to end against the numpy/scipy peer (same log, same K)", benchPeer],
    ["ingest", "ingest", benchIngest],
    ["slack", "slack (signed events over loopback)", benchSlack],
  ];
  const tables: [string, TableRow[]][] = [];
  for (const [key, title, run] of sections) {
    if (wanted.size > 0 && !wanted.has(key)) continue;
    const rows = withTargets(await run(), title);
    tables.push([title, rows]);
    printTable(title, rows);
  }
  const all = tables.flatMap(([, rows]) => rows);
  const met = all.filter((row) => row.met === true).length;
  const missed = all.filter((row) => row.met === false);
  const [loadEnd] = loadavg();
  console.log(`\nload average ${loadEnd.toFixed(2)} at end`);
  if (missed.length > 0) {
    console.log(`MISSED: ${missed.map((row) => row.name.trim()).join("; ")}`);
  }
  console.log(`bench: ${met} targets met, ${missed.length} missed`);
}

await main();
