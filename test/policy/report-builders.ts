/**
 * Test helpers: a minimal sufficient `AnalysisReport` whose top member has a given share and
 * probability of being at or above the line, and an insufficient one.
 */
import type { AnalysisReport } from "../../src/domain/report.js";

export function makeReport(options: {
  share: number;
  pAbove: number;
  threshold?: number;
  confidence?: number;
  channel?: string;
}): AnalysisReport {
  const threshold = options.threshold ?? 0.3;
  const confidence = options.confidence ?? 0.8;
  const crossed = options.pAbove >= confidence;
  const top = { member: "ana", share: options.share, low: 0, high: 1, pAbove: options.pAbove };
  return {
    version: 1,
    channel: options.channel ?? "c1",
    window: {
      from: "2026-10-05T09:00:00Z",
      until: "2026-11-02T09:00:00Z",
      days: 28,
      halfLifeDays: 14,
    },
    settings: {
      replyWeight: 1,
      mentionWeight: 1,
      background: 1,
      priorStrength: 1,
      posterior: "exact",
      selfWeight: 0.5,
      samples: 400,
      interval: 0.9,
      seed: 1,
      threshold,
      thresholdMode: "fixed",
      confidence,
    },
    status: "ok",
    members: 6,
    signals: 100,
    sufficient: true,
    needed: null,
    influence: [{ ...top, attentionReceived: 1, named: false }],
    top,
    effectiveVoices: { value: 3, low: 2, high: 4 },
    balance: 0.5,
    hhi: null,
    concentration: null,
    consensus: { closedGroups: 1, reached: true, secondEigenvalue: 0.5, roundsToHalve: 1 },
    contributors: [],
    groups: null,
    clusters: null,
    line: { threshold, crossed, member: crossed ? "ana" : null, probability: options.pAbove },
  };
}

export function insufficientReport(): AnalysisReport {
  return {
    ...makeReport({ share: 0.9, pAbove: 1 }),
    status: "insufficient",
    sufficient: false,
    needed: { members: 2, signals: 10 },
    influence: null,
    top: null,
    effectiveVoices: null,
    balance: null,
    consensus: null,
    contributors: null,
    line: null,
  };
}
