/**
 * One source of truth for the settings table: every environment variable the code reads (in
 * src/config and adapters/, found by scanning the source for `env.X`, `env["X"]` and
 * destructuring from an `env` object) has a row in `describeSettings()`, and the README's table
 * is exactly `renderSettingsTable()`. `PLUMBLINE_WRITE_DOCS=1 npx vitest run test/config`
 * rewrites the README's table from the rows.
 */
import { readdirSync, readFileSync, statSync, writeFileSync } from "node:fs";
import { join } from "node:path";
import { describe, expect, it } from "vitest";
import {
  CLI_ONLY_SETTINGS,
  describeSettings,
  renderSettingsTable,
} from "../../src/config/describe-settings.js";
import { ENV_FIELDS } from "../../src/config/env-schema.js";

const ROOT = join(import.meta.dirname, "..", "..");
const START = "PLUMBLINE_WRITE_DOCS=1 npx vitest run test/config -->";
const END = "<!-- end of settings table -->";

function sourceFiles(dir: string): string[] {
  return readdirSync(dir).flatMap((name) => {
    const path = join(dir, name);
    if (statSync(path).isDirectory()) return sourceFiles(path);
    return name.endsWith(".ts") ? [path] : [];
  });
}

/** Names of environment variables read in `source`. */
function envReads(source: string): string[] {
  const names = new Set<string>();
  for (const m of source.matchAll(/\benv\??\.([A-Z][A-Z0-9_]*)\b/g)) names.add(m[1]);
  for (const m of source.matchAll(/\benv\[\s*["'`]([A-Z][A-Z0-9_]*)["'`]\s*\]/g)) names.add(m[1]);
  for (const m of source.matchAll(/\{([^{}]*)\}\s*=\s*[\w.]*\benv\b/g)) {
    for (const part of m[1].split(",")) {
      const key = part.split(":")[0].trim();
      if (/^[A-Z][A-Z0-9_]*$/.test(key)) names.add(key);
    }
  }
  return [...names].sort();
}

const reads = [
  ...new Set(
    ["src/config", "adapters"].flatMap((dir) =>
      sourceFiles(join(ROOT, dir)).flatMap((file) => envReads(readFileSync(file, "utf8"))),
    ),
  ),
].sort();

describe("the settings table", () => {
  it("finds reads in every form the code uses (so the scan itself can fail)", () => {
    expect(envReads('if (io.env.PLUMBLINE_DEBUG) x; process.env["A_B"];')).toEqual([
      "A_B",
      "PLUMBLINE_DEBUG",
    ]);
    expect(envReads("const { PLUMBLINE_ID_KEY: idKey, PORT } = io.env;")).toEqual([
      "PLUMBLINE_ID_KEY",
      "PORT",
    ]);
    expect(reads).toEqual(expect.arrayContaining(["PLUMBLINE_DEBUG", "MICROSOFT_APP_ID"]));
  });

  it("has a row for every variable read in src/config and adapters, and for every schema field", () => {
    const rows = new Set(describeSettings().map((r) => r.setting));
    const missing = [...reads, ...Object.keys(ENV_FIELDS)].filter(
      (name) => !rows.has(name as never),
    );
    expect(missing).toEqual([]);
    expect(reads.filter((name) => !(name in ENV_FIELDS))).toEqual([...CLI_ONLY_SETTINGS]);
  });

  it("is the README's table, including PLUMBLINE_REPORT_SECRET and PLUMBLINE_PUBLIC_URL", () => {
    const path = join(ROOT, "README.md");
    const readme = readFileSync(path, "utf8");
    const from = readme.indexOf(START);
    const to = readme.indexOf(END);
    expect(from).toBeGreaterThan(0);
    expect(to).toBeGreaterThan(from);
    const table = renderSettingsTable();
    if (process.env.PLUMBLINE_WRITE_DOCS === "1") {
      writeFileSync(
        path,
        `${readme.slice(0, from + START.length)}\n\n${table}\n${readme.slice(to)}`,
      );
      return;
    }
    expect(readme.slice(from + START.length, to).trim()).toBe(table.trim());
    expect(table).toContain("`PLUMBLINE_REPORT_SECRET`");
    expect(table).toContain("`PLUMBLINE_PUBLIC_URL`");
  });
});
