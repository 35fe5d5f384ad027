/**
 * Test helpers for the chart tests: an invented channel where most attention flows to one member,
 * with a mix of consent levels and distinctive ids, so a test can tell whether a `counted`
 * member's id reached the markup.
 */

import { analyzeSnapshotDetailed } from "../../src/analysis/analyze-snapshot.js";
import type { ConsentLevel } from "../../src/domain/events.js";
import type { AnalysisSettings } from "../../src/domain/settings.js";
import { DAY_MS, DEFAULT_SETTINGS } from "../../src/domain/settings.js";
import { mentionEvents, snapshotOf } from "../report/log-builders.js";

/** Named members may be named; the others are only counted. */
export const NAMED_IDS = ["ana-named", "bo-named"] as const;
export const COUNTED_IDS = [
  "zq-counted-1",
  "zq-counted-2",
  "zq-counted-3",
  "zq-counted-4",
] as const;

export const FIXTURE_PAIRS: [string, string, number][] = [
  ["zq-counted-1", "ana-named", 9],
  ["zq-counted-2", "ana-named", 7],
  ["zq-counted-3", "ana-named", 6],
  ["zq-counted-4", "ana-named", 4],
  ["bo-named", "ana-named", 5],
  ["ana-named", "bo-named", 4],
  ["ana-named", "zq-counted-1", 2],
  ["zq-counted-1", "zq-counted-2", 2],
  ["zq-counted-2", "zq-counted-3", 2],
  ["zq-counted-3", "zq-counted-4", 2],
  ["zq-counted-4", "bo-named", 2],
];

export function consentOf(member: string): ConsentLevel {
  return (NAMED_IDS as readonly string[]).includes(member) ? "named" : "counted";
}

export const FIXTURE_SETTINGS: AnalysisSettings = { ...DEFAULT_SETTINGS, samples: 200, seed: 7 };

export function fixtureSnapshot() {
  return snapshotOf(mentionEvents(FIXTURE_PAIRS, { consent: consentOf }));
}

export function fixtureAnalysis() {
  return analyzeSnapshotDetailed(fixtureSnapshot(), FIXTURE_SETTINGS);
}

/** The fixture's activity twice, 14 days apart: three weeks of history. */
export function twoPhaseSnapshot() {
  const first = mentionEvents(FIXTURE_PAIRS, { consent: consentOf });
  const again = first
    .filter((e) => e.type === "message")
    .map((e) => ({ ...e, at: e.at + 14 * DAY_MS, id: `again-${"id" in e ? e.id : ""}` }));
  return snapshotOf([...first, ...again]);
}
