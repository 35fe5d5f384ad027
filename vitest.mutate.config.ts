/**
 * The vitest configuration of `npm run mutate` (stryker.config.json): the suite's own settings,
 * with the test files narrowed by PLUMBLINE_MUTATE_TESTS (comma-separated globs; a leading "!"
 * leaves files out) when a folder's score is measured with that folder's tests only, e.g.
 *   PLUMBLINE_MUTATE_TESTS='test/ingest/**' npm run mutate -- --mutate 'src/ingest/**\/*.ts'
 * Without it, every test file runs, as in `npm test`. Tests that run the CLI as the user `nobody`
 * cannot read Stryker's sandbox (made private by mkdtemp): leave them out with
 * '!test/store/safety-sqlite.test.ts'.
 * Stryker's instrumented code is many times slower in the numeric hot loops (every mutant's switch
 * is in them), so a test that takes 2 s in `npm test` can pass vitest's per-test timeout in the
 * dry run: PLUMBLINE_MUTATE_TEST_TIMEOUT (ms) raises it for a mutation run only.
 */
import { configDefaults, defineConfig } from "vitest/config";
import base from "./vitest.config.js";

const globs = (process.env.PLUMBLINE_MUTATE_TESTS ?? "")
  .split(",")
  .map((s) => s.trim())
  .filter((s) => s.length > 0);
const include = globs.filter((g) => !g.startsWith("!"));
const exclude = globs.filter((g) => g.startsWith("!")).map((g) => g.slice(1));
const testTimeout = Number(process.env.PLUMBLINE_MUTATE_TEST_TIMEOUT ?? "");

// Spread, not mergeConfig: mergeConfig concatenates arrays, so the base include would stay.
export default defineConfig({
  ...base,
  test: {
    ...base.test,
    ...(include.length > 0 ? { include } : {}),
    ...(exclude.length > 0 ? { exclude: [...configDefaults.exclude, ...exclude] } : {}),
    ...(testTimeout > 0 ? { testTimeout } : {}),
  },
});
