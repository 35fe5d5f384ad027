import { describe, expect, it } from "vitest";
import { analyzeSnapshot } from "../../src/analysis/analyze-snapshot.js";
import { DAY_MS, DEFAULT_SETTINGS } from "../../src/domain/settings.js";
import {
  type BalanceNoteState,
  evaluateBalanceNote,
  NOTE_COOLDOWN_MS,
  parseBalanceNoteState,
  REARM_MARGIN,
} from "../../src/policy/balance-note.js";
import { mentionEvents, mutualPairs, snapshotOf } from "../report/log-builders.js";
import { insufficientReport, makeReport } from "./report-builders.js";

const T = Date.UTC(2026, 10, 2, 9, 0, 0);
const HOUR = 3_600_000;

/** Feeds a sequence of (time, share, pAbove) through the policy, carrying the state. */
function run(
  steps: readonly { at: number; share: number; pAbove: number }[],
  notes: "channel" | "facilitators" | "off" = "channel",
) {
  let state: BalanceNoteState | null = null;
  return steps.map((step) => {
    const verdict = evaluateBalanceNote({
      report: makeReport({ share: step.share, pAbove: step.pAbove }),
      state,
      now: step.at,
      notes,
    });
    // The stored state goes through JSON, as the store keeps it.
    state = parseBalanceNoteState(JSON.parse(JSON.stringify(verdict.next)));
    return verdict;
  });
}

describe("evaluateBalanceNote", () => {
  it("posts one note when the line is crossed, then none while the share stays near the line", () => {
    const verdicts = run([
      { at: T, share: 0.36, pAbove: 0.85 },
      { at: T + HOUR, share: 0.37, pAbove: 0.9 },
      { at: T + 2 * HOUR, share: 0.31, pAbove: 0.6 },
      // In the dead band (line 0.30, re-arm below 0.25): still disarmed.
      { at: T + 3 * HOUR, share: 0.26, pAbove: 0.2 },
      { at: T + 4 * HOUR, share: 0.36, pAbove: 0.85 },
    ]);
    expect(verdicts.map((v) => [v.due, v.reason])).toEqual([
      [true, "crossed"],
      [false, "waiting-to-rearm"],
      [false, "below-line"],
      [false, "below-line"],
      [false, "waiting-to-rearm"],
    ]);
    expect(verdicts[0].audience).toBe("channel");
    expect(verdicts[0].next).toEqual({ version: 1, armed: false, lastNoteAt: T });
  });

  it("re-arms only once the top share is below line − 0.05, and then notes again after the cooldown", () => {
    expect(REARM_MARGIN).toBe(0.05);
    const verdicts = run([
      { at: T, share: 0.4, pAbove: 0.95 },
      { at: T + DAY_MS, share: 0.251, pAbove: 0.1 },
      { at: T + 2 * DAY_MS, share: 0.249, pAbove: 0.05 },
      // Re-armed, but within 7 days of the first note.
      { at: T + 3 * DAY_MS, share: 0.4, pAbove: 0.95 },
      { at: T + NOTE_COOLDOWN_MS - 1, share: 0.4, pAbove: 0.95 },
      { at: T + NOTE_COOLDOWN_MS, share: 0.4, pAbove: 0.95 },
    ]);
    expect(verdicts.map((v) => v.reason)).toEqual([
      "crossed",
      "below-line",
      "below-line",
      "cooldown",
      "cooldown",
      "crossed",
    ]);
    expect(verdicts[1].next.armed).toBe(false);
    expect(verdicts[2].next.armed).toBe(true);
    expect(verdicts[4].next).toEqual({ version: 1, armed: true, lastNoteAt: T });
  });

  it("keeps at most one note in any 7 days even when the share swings fully each day", () => {
    const steps: { at: number; share: number; pAbove: number }[] = [];
    for (let day = 0; day < 28; day++) {
      steps.push({ at: T + day * DAY_MS, share: 0.45, pAbove: 0.99 });
      steps.push({ at: T + day * DAY_MS + 12 * HOUR, share: 0.1, pAbove: 0 });
    }
    const notes = run(steps)
      .map((v, i) => (v.due ? steps[i].at : null))
      .filter((at): at is number => at !== null);
    expect(notes).toEqual([T, T + 7 * DAY_MS, T + 14 * DAY_MS, T + 21 * DAY_MS]);
  });

  it("is never due with notes off, however often the line is crossed", () => {
    const steps = Array.from({ length: 60 }, (_, i) => ({
      at: T + i * DAY_MS,
      share: i % 2 === 0 ? 0.5 : 0.1,
      pAbove: i % 2 === 0 ? 1 : 0,
    }));
    const verdicts = run(steps, "off");
    expect(verdicts.every((v) => !v.due && v.reason === "notes-off" && v.audience === null)).toBe(
      true,
    );
    expect(verdicts.every((v) => v.next.lastNoteAt === null)).toBe(true);
  });

  it("sends the note to the facilitators when the channel says so", () => {
    const [verdict] = run([{ at: T, share: 0.5, pAbove: 0.99 }], "facilitators");
    expect(verdict).toMatchObject({ due: true, audience: "facilitators" });
  });

  it("uses the report's own line: pAbove below confidence is not a crossing", () => {
    const report = makeReport({ share: 0.35, pAbove: 0.79, confidence: 0.8 });
    const verdict = evaluateBalanceNote({ report, state: null, now: T, notes: "channel" });
    expect(verdict).toMatchObject({ due: false, reason: "below-line" });
  });

  it("is not due and keeps the state when the report has too little data", () => {
    const state: BalanceNoteState = { version: 1, armed: false, lastNoteAt: T - DAY_MS };
    const verdict = evaluateBalanceNote({
      report: insufficientReport(),
      state,
      now: T,
      notes: "channel",
    });
    expect(verdict).toEqual({ due: false, reason: "insufficient", audience: null, next: state });
  });

  it("any one sign of missing figures alone stops a note that would otherwise be due", () => {
    // Found by mutation testing: the test above makes all four conditions true at once.
    const due = makeReport({ share: 0.9, pAbove: 1 });
    expect(evaluateBalanceNote({ report: due, state: null, now: T, notes: "channel" }).due).toBe(
      true,
    );
    for (const report of [
      { ...due, status: "no-unique-shares" as const },
      { ...due, sufficient: false },
      { ...due, line: null },
      { ...due, top: null },
    ]) {
      const verdict = evaluateBalanceNote({ report, state: null, now: T, notes: "channel" });
      expect(verdict).toMatchObject({ due: false, reason: "insufficient" });
    }
  });

  it("a top share exactly at line − 0.05 does not re-arm (strictly below is needed)", () => {
    const state: BalanceNoteState = { version: 1, armed: false, lastNoteAt: T - 30 * DAY_MS };
    const at = makeReport({ share: 0.3 - REARM_MARGIN, pAbove: 0, threshold: 0.3 });
    expect(evaluateBalanceNote({ report: at, state, now: T, notes: "channel" }).next.armed).toBe(
      false,
    );
    const below = makeReport({ share: 0.3 - REARM_MARGIN - 1e-9, pAbove: 0, threshold: 0.3 });
    expect(evaluateBalanceNote({ report: below, state, now: T, notes: "channel" }).next.armed).toBe(
      true,
    );
  });
});

describe("parseBalanceNoteState", () => {
  it("round-trips the state through JSON and rejects anything else", () => {
    const state: BalanceNoteState = { version: 1, armed: false, lastNoteAt: T };
    expect(parseBalanceNoteState(JSON.parse(JSON.stringify(state)))).toEqual(state);
    expect(parseBalanceNoteState({ version: 1, armed: true, lastNoteAt: null })).toEqual({
      version: 1,
      armed: true,
      lastNoteAt: null,
    });
    for (const bad of [null, 3, "x", {}, { version: 2, armed: true, lastNoteAt: null }]) {
      expect(parseBalanceNoteState(bad)).toBeNull();
    }
    expect(parseBalanceNoteState({ version: 1, armed: "yes", lastNoteAt: null })).toBeNull();
    expect(parseBalanceNoteState({ version: 1, armed: true, lastNoteAt: "2026" })).toBeNull();
  });

  it("rejects a last-note time that is a number but not a finite one", () => {
    // JSON cannot carry these, but a store that keeps the object as is (structured clone) can.
    for (const lastNoteAt of [Number.POSITIVE_INFINITY, Number.NEGATIVE_INFINITY, Number.NaN]) {
      expect(parseBalanceNoteState({ version: 1, armed: true, lastNoteAt })).toBeNull();
    }
    expect(parseBalanceNoteState({ version: 1, armed: true, lastNoteAt: 0 })).toEqual({
      version: 1,
      armed: true,
      lastNoteAt: 0,
    });
  });
});

describe("the policy on reports from the analysis", () => {
  it("notes a star channel, and re-arms when the channel becomes a ring", () => {
    // A random walk on an undirected graph has stationary distribution deg(v) / 2|E|
    // (Lovász 1993, "Random walks on graphs: a survey", §1): the hub of a star with 5 leaves
    // holds 1/2; the background attention (β = 1) pulls it a little lower.
    const leaves = ["bo", "cy", "di", "ed", "fay"];
    const star = mutualPairs(
      leaves.map((l) => ["hub", l] as [string, string]),
      8,
    );
    const starReport = analyzeSnapshot(snapshotOf(mentionEvents(star)), DEFAULT_SETTINGS);
    expect(starReport.top?.member).toBe("hub");
    expect(starReport.top?.share).toBeGreaterThan(0.4);
    expect(starReport.top?.share).toBeLessThan(0.5);
    expect(starReport.line?.crossed).toBe(true);
    const first = evaluateBalanceNote({
      report: starReport,
      state: null,
      now: T,
      notes: "channel",
    });
    expect(first.due).toBe(true);

    // A ring is vertex-transitive: every member holds 1/6, well below line − 0.05 (1/3 − 0.05).
    // (Messages a few seconds apart decay by slightly different amounts: tolerance 1e-4.)
    const members = ["hub", ...leaves];
    const ring = mutualPairs(
      members.map((m, i) => [m, members[(i + 1) % 6]] as [string, string]),
      8,
    );
    const ringReport = analyzeSnapshot(snapshotOf(mentionEvents(ring)), DEFAULT_SETTINGS);
    expect(ringReport.top?.share).toBeCloseTo(1 / 6, 4);
    const later = evaluateBalanceNote({
      report: ringReport,
      state: first.next,
      now: T + DAY_MS,
      notes: "channel",
    });
    expect(later).toMatchObject({ due: false, reason: "below-line", next: { armed: true } });
  });
});
