/**
 * The digest, note, how-to-read and help messages built from reports of invented channels.
 * Figures are checked against the closed form for mutual equal attention with no prior (β = 0):
 * s_i = c_i / Σ C, by reversibility (Levin, Peres & Wilmer, Markov Chains and Mixing
 * Times, 2nd ed. 2017, §1.6, detailed balance; from memory).
 */
import { describe, expect, it } from "vitest";
import { analyzeSnapshot } from "../../src/analysis/analyze-snapshot.js";
import { type AnalysisSettings, DEFAULT_SETTINGS } from "../../src/domain/settings.js";
import { CAUTIONS_FULL, CAUTIONS_LINE } from "../../src/report/cautions.js";
import { consentNoticeBlocks } from "../../src/report/consent-notice.js";
import { digestMessage } from "../../src/report/digest-blocks.js";
import { explainMessage } from "../../src/report/explain-blocks.js";
import { probability } from "../../src/report/format.js";
import { helpMessage } from "../../src/report/help-text.js";
import { noteMessage, suggestedCap } from "../../src/report/note-blocks.js";
import { renderText } from "../../src/report/render-text.js";
import { mentionEvents, snapshotOf } from "./log-builders.js";

const exact: AnalysisSettings = {
  ...DEFAULT_SETTINGS,
  halfLifeDays: 0,
  background: 0,
  samples: 200,
  seed: 11,
  clusters: false,
};

/** A star: everyone talks with "hub" (mutually, 6 times each), plus a weak ring among the rest. */
function starReport(consent: "named" | "counted" = "counted") {
  const leaves = ["b", "c", "d", "e", "f"];
  const pairs: [string, string, number][] = [];
  for (const x of leaves) pairs.push(["hub", x, 6], [x, "hub", 6]);
  for (let k = 0; k < leaves.length; k++) {
    const y = leaves[(k + 1) % leaves.length];
    pairs.push([leaves[k], y, 1], [y, leaves[k], 1]);
  }
  const events = mentionEvents(pairs, { consent: (m) => (m === "hub" ? consent : "counted") });
  return analyzeSnapshot(snapshotOf(events), exact);
}

describe("digestMessage", () => {
  it("gives the headline figures of the closed form, and the text is the blocks rendered", () => {
    const report = starReport();
    // c_hub = 30, c_leaf = 6 + 2 = 8; Σ C = 70; β = 0: s_hub = 30/70, s_leaf = 8/70.
    const hub = 30 / 70;
    const leaf = 8 / 70;
    const voices = 1 / (hub * hub + 5 * leaf * leaf);
    const message = digestMessage({ report, previous: null, policy: { namesOn: false } });
    expect(message.text).toBe(renderText(message.blocks));
    expect(message.text).toContain(`${voices.toFixed(1)} of 6`);
    expect(message.text).toMatch(
      new RegExp(`Largest share\\s+${Math.round(hub * 100)}%, interval`),
    );
    expect(message.text).toContain("first digest: nothing to compare with yet");
    expect(message.blocks.some((b) => b.kind === "bars")).toBe(true);
    expect(message.text).toContain(CAUTIONS_LINE);
    expect(message.text).toContain("/influence explain");
    expect(message.text).not.toContain("hub");
  });

  it("reports the change since the previous digest", () => {
    const report = starReport();
    const even = analyzeSnapshot(
      snapshotOf(
        mentionEvents(
          ["a", "b", "c", "d", "e"].flatMap((x, k, all) => {
            const y = all[(k + 1) % all.length];
            return [[x, y, 3] as [string, string, number], [y, x, 3] as [string, string, number]];
          }),
        ),
      ),
      exact,
    );
    // Equal degrees on the ring: every share is 1/5, so 5.0 effective voices and 20%.
    expect(even.effectiveVoices?.value).toBeCloseTo(5, 6);
    const text = digestMessage({ report, previous: even, policy: { namesOn: false } }).text;
    const now = report.effectiveVoices?.value ?? 0;
    expect(text).toContain(`effective voices −${(5 - now).toFixed(1)} (5.0 → ${now.toFixed(1)})`);
    expect(text).toContain(`(20% → ${Math.round((30 / 70) * 100)}%)`);
  });

  it("with too little data, says how many more members and signals are needed", () => {
    const events = mentionEvents([
      ["a", "b", 3],
      ["b", "c", 2],
    ]);
    const report = analyzeSnapshot(snapshotOf(events), exact);
    const text = digestMessage({ report, previous: null, policy: { namesOn: false } }).text;
    expect(text).toContain("3 active opted-in members and 5 replies or mentions");
    expect(text).toContain("2 more opted-in members taking part and 15 more replies or mentions");
    expect(text).toContain(CAUTIONS_LINE);
    expect(text).not.toMatch(/Effective voices/);
  });
});

describe("noteMessage", () => {
  it("names nobody by default and says what a facilitator might try", () => {
    const report = starReport("named");
    expect(report.line?.crossed).toBe(true);
    const text = noteMessage({ report, policy: { namesOn: false }, audience: "channel" }).text;
    expect(text).toContain("One member's influence share is above this channel's line");
    expect(text).toContain(`probability ${probability(report.line?.probability ?? 0)}`);
    expect(text).toContain("This note names nobody");
    expect(text).toContain("/influence whatif cap 0.25");
    expect(text).toContain(CAUTIONS_LINE);
    expect(text).not.toContain("hub");
  });

  it("names the member only when the naming rules allow it", () => {
    const named = starReport("named");
    const withNames = noteMessage({
      report: named,
      policy: {
        namesOn: true,
        displayName: (m) => (m === "hub" ? "Hana Hub" : m),
        // Six members, one named: every other reader leaves 4 unknown, enough only for k ≤ 4.
        disclosure: { minMembers: 4 },
      },
      audience: "facilitators",
    }).text;
    expect(withNames).toContain("Hana Hub's influence share");
    const withheld = noteMessage({
      report: named,
      policy: { namesOn: true, displayName: (m) => (m === "hub" ? "Hana Hub" : m) },
      audience: "facilitators",
    }).text;
    expect(withheld).not.toContain("Hana Hub");
    expect(withheld).toContain("One member's influence share");
    expect(withNames).toContain("What you might try");
    const counted = starReport("counted");
    const refused = noteMessage({
      report: counted,
      policy: { namesOn: true, displayName: () => "Hana Hub" },
      audience: "facilitators",
    }).text;
    expect(refused).not.toContain("Hana Hub");
    const self = noteMessage({
      report: counted,
      policy: { namesOn: false, reader: "hub" },
      audience: "channel",
    }).text;
    expect(self).toContain("Your influence share");
  });

  it("says so when nobody is above the line", () => {
    const report = analyzeSnapshot(
      snapshotOf(
        mentionEvents(
          ["a", "b", "c", "d", "e"].flatMap((x, k, all) => {
            const y = all[(k + 1) % all.length];
            return [[x, y, 4] as [string, string, number], [y, x, 4] as [string, string, number]];
          }),
        ),
      ),
      exact,
    );
    const text = noteMessage({ report, policy: { namesOn: false }, audience: "channel" }).text;
    expect(text).toContain("No member is clearly above this channel's line of 40%");
  });

  it("suggests a cap no lower than an even split over the others", () => {
    expect(suggestedCap(6)).toBe(0.25);
    expect(suggestedCap(4)).toBeCloseTo(0.35, 12); // 1/3 rounded up to 5% steps
    expect(suggestedCap(3)).toBe(0.5);
  });
});

describe("how to read, consent notice and help", () => {
  it("explain carries the full cautions and names no platform", () => {
    const { text, blocks } = explainMessage();
    expect(text).toBe(renderText(blocks));
    for (const caution of CAUTIONS_FULL) expect(text).toContain(caution);
    expect(text).not.toMatch(/slack|teams/i);
  });

  it("the consent notice says what is never stored and how to leave", () => {
    const text = renderText(consentNoticeBlocks());
    expect(text.startsWith("What plumbline counts")).toBe(true);
    expect(text).toContain("never stored");
    expect(text).toContain("/influence leave");
    expect(text).toContain("HR decision");
  });

  it("the consent notice says what counted protects against and what it cannot, before joining", () => {
    const blocks = consentNoticeBlocks();
    const text = renderText(blocks);
    const protects = text.indexOf("What `counted` protects you from");
    const cannot = text.indexOf("What it cannot protect you from");
    expect(protects).toBeGreaterThan(0);
    expect(cannot).toBeGreaterThan(protects);
    expect(text).toContain("within 5 points");
    expect(text).toContain("very small channel");
    // Plain words: none of the trade's terms reach the notice.
    expect(text).not.toMatch(/disclosure|suppression|stationary|DeGroot|k-anonym/i);
  });

  it("the how to read states the disclosure rule with k from minmembers", () => {
    const { text } = explainMessage();
    expect(text).toContain("within 5 points");
    expect(text).toContain("minmembers setting, never below 3");
    expect(text).toContain("hidden: fewer than k members");
  });

  it("help echoes the unknown input, shortened", () => {
    const long = "x".repeat(100);
    const text = helpMessage({ unknown: long }).text;
    expect(text).toContain(`I did not understand "${"x".repeat(57)}..."`);
  });
});
