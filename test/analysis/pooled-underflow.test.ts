/**
 * A profile entry can underflow to exactly 0 in one posterior draw (a member almost nobody
 * answers, whose Gamma variate is below 1e−308). The pooled direction of a large channel must
 * give that member no weight in that draw, as the per-cell draws already do, instead of asking
 * for a Gamma variate of shape 0. Found by the burst bench: a 130-member channel with three
 * messages a member failed its digest with "gamma shape must be a positive finite number, got 0".
 */
import { describe, expect, it } from "vitest";
import { syntheticChannel } from "../../bench/synthetic-channel.js";
import { analyzeSnapshot } from "../../src/analysis/analyze-snapshot.js";
import { buildLedgers } from "../../src/attention/channel-ledger.js";
import { DEFAULT_SETTINGS } from "../../src/domain/settings.js";

describe("pooled draws with a profile entry that underflows", () => {
  it("a 130-member channel with three messages a member is analysed (seeds 2 and 3)", () => {
    const channel = syntheticChannel({
      members: 130,
      messages: 390,
      seed: 3,
      channel: "C1",
      start: Date.UTC(2026, 9, 1),
      days: 28,
    });
    const snapshot = buildLedgers(channel.events).get("C1");
    if (!snapshot) throw new Error("no channel C1");
    for (const seed of [2, 3]) {
      const report = analyzeSnapshot(snapshot, { ...DEFAULT_SETTINGS, samples: 40, seed });
      expect(report.settings.posterior).toBe("pooled");
      const influence = report.influence ?? [];
      expect(influence.length).toBeGreaterThan(100);
      const total = influence.reduce((s, e) => s + e.share, 0);
      expect(total).toBeGreaterThan(0.99);
      for (const e of influence) {
        expect(Number.isFinite(e.low) && Number.isFinite(e.high)).toBe(true);
        expect(e.low).toBeLessThanOrEqual(e.high);
      }
    }
  });
});
