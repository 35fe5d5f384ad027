/**
 * The vitest configuration of `npm run mutate` (stryker.config.json): the suite's own settings,
 * with the test files narrowed by PLUMBLINE_MUTATE_TESTS (comma-separated globs) when a folder's
 * score is measured with that folder's tests only, e.g.
 *   PLUMBLINE_MUTATE_TESTS='test/ingest/**' npm run mutate -- --mutate 'src/ingest/**\/*.ts'
 * Without it, every test file runs, as in `npm test`.
 */
import { defineConfig, mergeConfig } from "vitest/config";
import base from "./vitest.config.js";

const narrowed = process.env.PLUMBLINE_MUTATE_TESTS?.split(",")
  .map((s) => s.trim())
  .filter((s) => s.length > 0);

export default mergeConfig(
  base,
  defineConfig({
    test: narrowed && narrowed.length > 0 ? { include: narrowed } : {},
  }),
);
