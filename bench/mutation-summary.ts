/**
 * Prints the mutation score per folder from Stryker's JSON report (the mutation-testing-elements
 * report schema: files → mutants → status). Score = (killed + timeout) / (killed + timeout +
 * survived + no coverage), Stryker's own definition; compile and runtime errors and ignored
 * mutants are left out. Target: ≥ 80% in each folder (docs/testing.md). Also lists the surviving
 * mutants of the model and ingest code, to be killed by a test or explained as equivalent.
 */
import { readFileSync } from "node:fs";
import { dirname } from "node:path";

interface Mutant {
  readonly mutatorName: string;
  readonly status: string;
  readonly replacement?: string;
  readonly location: { readonly start: { readonly line: number } };
}

interface Report {
  readonly files: Record<string, { readonly mutants: readonly Mutant[] }>;
}

const FILE = process.argv[2] ?? "reports/mutation/mutation.json";
const report = JSON.parse(readFileSync(FILE, "utf8")) as Report;

interface Tally {
  killed: number;
  survived: number;
  noCoverage: number;
  timeout: number;
  other: number;
}

const byFolder = new Map<string, Tally>();
const survivors: string[] = [];
for (const [path, file] of Object.entries(report.files)) {
  const folder = dirname(path).replace(/^.*?(src\/[^/]+).*$/, "$1");
  const tally = byFolder.get(folder) ?? {
    killed: 0,
    survived: 0,
    noCoverage: 0,
    timeout: 0,
    other: 0,
  };
  for (const m of file.mutants) {
    if (m.status === "Killed") tally.killed++;
    else if (m.status === "Survived") tally.survived++;
    else if (m.status === "NoCoverage") tally.noCoverage++;
    else if (m.status === "Timeout") tally.timeout++;
    else tally.other++;
    if (
      (m.status === "Survived" || m.status === "NoCoverage") &&
      /src\/(influence|analysis|ingest)\//.test(path)
    ) {
      survivors.push(
        `${path}:${m.location.start.line} ${m.mutatorName} → ${m.replacement ?? ""}`.slice(0, 160),
      );
    }
  }
  byFolder.set(folder, tally);
}

console.log("\n| folder | killed | timeout | survived | no coverage | score | target 80% |");
console.log("|---|---|---|---|---|---|---|");
for (const [folder, t] of [...byFolder].sort()) {
  const valid = t.killed + t.timeout + t.survived + t.noCoverage;
  const score = valid === 0 ? 1 : (t.killed + t.timeout) / valid;
  console.log(
    `| ${folder} | ${t.killed} | ${t.timeout} | ${t.survived} | ${t.noCoverage} | ${(100 * score).toFixed(1)}% | ${score >= 0.8 ? "PASS" : "MISSED"} |`,
  );
}
if (survivors.length > 0) {
  console.log(`\nSurviving mutants in the model and ingest code (${survivors.length}):`);
  for (const line of survivors) console.log(`- ${line}`);
}
