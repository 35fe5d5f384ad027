/**
 * How figures are written (probabilities never as certainties, changes from the printed values),
 * the what-if note on a cap that fixes every share, and the README's figures table against
 * `/influence explain`, word for word. The even split under a cap of 1/(n − 1): each row then puts
 * 1/(n − 1) on every other member, the chain is doubly stochastic, so its stationary vector is
 * uniform (Levin, Peres & Wilmer, Markov Chains and Mixing Times, 2nd ed. 2017, §1.6; from memory).
 */
import { readFileSync } from "node:fs";
import { describe, expect, it } from "vitest";
import { whatIfCap } from "../../src/analysis/what-if.js";
import { DEFAULT_SETTINGS } from "../../src/domain/settings.js";
import { capForcesEven, whatIfBlocks } from "../../src/report/compare-blocks.js";
import { changeRow } from "../../src/report/digest-blocks.js";
import {
  explainMessage,
  explainMoreMessage,
  FIGURES,
  figureLine,
} from "../../src/report/explain-blocks.js";
import { changeText, printedChange, probability } from "../../src/report/format.js";
import { renderText } from "../../src/report/render-text.js";
import { reportPage } from "../../src/report/report-page.js";
import { makeReport } from "../policy/report-builders.js";
import { mentionEvents, mutualPairs, snapshotOf } from "./log-builders.js";

describe("probability", () => {
  it.each([
    [1, "over 99%"],
    [0.996, "over 99%"],
    [0.994, "99%"],
    [0.5, "50%"],
    [0.006, "1%"],
    [0.004, "under 1%"],
    [0, "under 1%"],
  ])("%d is written %j", (p, text) => {
    expect(probability(p)).toBe(text);
  });
});

describe("changes from the printed values", () => {
  it.each([
    ["11.6", "11.7", 1, "+0.1"],
    ["3.9", "10.0", 1, "+6.1"],
    ["14%", "15%", 0, "+1"],
    ["45%", "32%", 0, "−13"],
    ["<1%", "2%", 0, "+2"],
    ["0.33", "0.90", 2, "+0.57"],
  ])("%s → %s is %s", (before, after, digits, delta) => {
    expect(printedChange(before, after, digits)).toBe(delta);
  });

  it('says "no change" in words, never ±0', () => {
    expect(printedChange("14%", "14%", 0)).toBeNull();
    expect(changeText("largest share", "14%", "14%", 0, "point")).toBe(
      "largest share: no change (14%)",
    );
    expect(changeText("largest share", "14%", "15%", 0, "point")).toBe(
      "largest share +1 point (14% → 15%)",
    );
  });

  it("the digest's change row follows the rounding the reader sees, not the raw values", () => {
    // Raw 11.64 → 11.66 is +0.02, printed as 11.6 → 11.7: the reader must read +0.1.
    // Raw 14.49% → 14.51% is +0.02 points, printed 14% → 15%: +1 point.
    const base = makeReport({ share: 0.1449, pAbove: 0 });
    const before = { ...base, effectiveVoices: { value: 11.64, low: 10, high: 12 } };
    const after = {
      ...makeReport({ share: 0.1451, pAbove: 0 }),
      effectiveVoices: { value: 11.66, low: 10, high: 12 },
      window: { ...base.window, until: "2026-11-09T09:00:00Z" },
    };
    expect(changeRow(after, before).value).toBe(
      "effective voices +0.1 (11.6 → 11.7); largest share +1 point (14% → 15%)",
    );
    const same = { ...makeReport({ share: 0.1449, pAbove: 0 }), window: after.window };
    expect(changeRow(same, before).value).toContain("largest share: no change (14%)");
  });
});

describe("whatif cap", () => {
  it("says why a cap of 1/(n − 1) fixes every share at 1/n", () => {
    const members = ["a", "b", "c", "d", "e", "f"];
    const pairs = [
      ...mutualPairs(
        members.slice(1).map((x) => ["a", x] as [string, string]),
        6,
      ),
      ...mutualPairs([["b", "c"]], 1),
    ];
    const settings = { ...DEFAULT_SETTINGS, samples: 100, seed: 3, halfLifeDays: 0 };
    const result = whatIfCap(snapshotOf(mentionEvents(pairs)), settings, { cap: 0.2 });
    // Closed form: every share 1/6, so effective voices exactly 6 and no spread.
    expect(result.after.top?.share).toBeCloseTo(1 / 6, 5); // reports round to 6 decimals
    expect(result.after.effectiveVoices?.value).toBeCloseTo(6, 4);
    const text = renderText(whatIfBlocks(result));
    expect(text).toContain("Why the capped figures have no spread: with 6 active members");
    expect(text).toContain("5 × 20% is already 100%");
    expect(text).toContain("Every share is then about 17%");
    const wider = renderText(
      whatIfBlocks(whatIfCap(snapshotOf(mentionEvents(pairs)), settings, { cap: 0.3 })),
    );
    expect(wider).not.toContain("Why the capped figures have no spread");
    expect(capForcesEven(0.25, 5)).toBe(true);
    expect(capForcesEven(0.0834, 13)).toBe(true); // 12 × 8.34% = 100.08%
    expect(capForcesEven(0.25, 6)).toBe(false);
  });
});

describe("the how to read and the README", () => {
  const readme = readFileSync(new URL("../../README.md", import.meta.url), "utf8");
  const rows = new Map(
    readme
      .split("\n")
      .filter((l) => l.startsWith("| ") && l.split(" | ").length === 3)
      .map((l) => {
        const [term, meaning, example] = l.slice(2, -2).split(" | ");
        return [term, { meaning, example }] as const;
      }),
  );

  it.each(FIGURES.map((f) => [f[0], f] as const))(
    "%s: the README's figures table says what explain says, word for word",
    (term, entry) => {
      const row = rows.get(term.toLowerCase());
      expect(row, `README has a row for ${term}`).toBeDefined();
      expect(row?.meaning).toBe(entry[1]);
      expect(row?.example).toBe(entry[2]);
      expect(explainMessage().text).toContain(figureLine(entry));
    },
  );

  it("explain shows each user term once with an example; the trade's names are in explain more", () => {
    const text = explainMessage().text;
    for (const term of [
      "Influence share",
      "Effective voices",
      "Balance",
      "Line",
      "Digest",
      "Note",
    ]) {
      expect(text.split(`\n${term}: `).length - 1, term).toBe(1);
    }
    const more = explainMoreMessage().text;
    for (const name of ["DeGroot", "stationary vector", "attention matrix", "posterior", "HHI"]) {
      expect(text).not.toContain(name);
      expect(more).toContain(name);
      expect(readme).toContain(name === "HHI" ? "HHI" : name);
    }
  });
});

describe("the report page's captions", () => {
  it("the weekly trend caption names the window the channel actually uses", () => {
    const base = makeReport({ share: 0.4, pAbove: 0.9 });
    const report = { ...base, window: { ...base.window, days: 14 } };
    const point = (until: number, value: number) => ({
      until,
      members: 6,
      effectiveVoices: { value, low: value - 1, high: value + 1 },
      top: { share: 0.4, low: 0.3, high: 0.5 },
      line: 0.3,
    });
    const html = reportPage({
      report,
      policy: { namesOn: false },
      history: [point(Date.UTC(2026, 10, 23), 3), point(Date.UTC(2026, 10, 30), 3.5)],
      generatedAt: Date.UTC(2026, 11, 1),
    });
    expect(html).toContain("counting the 14 days before it");
    expect(html).not.toContain("28-day");
  });
});
