/**
 * The compare chart: both periods on one common axis from 0, each labelled with its range and
 * figures; a period without figures is labelled as such.
 */
import { describe, expect, it } from "vitest";
import { comparePeriods } from "../../src/analysis/compare-periods.js";
import { parseDateRange } from "../../src/domain/date-range.js";
import { axisX, compareChart } from "../../src/report/charts/compare-chart.js";
import { decimal1 } from "../../src/report/format.js";
import { FIXTURE_SETTINGS, twoPhaseSnapshot } from "./chart-fixtures.js";

describe("compare chart", () => {
  it("maps values linearly onto the common axis and clamps to it", () => {
    const axis = { plotX: 12, plotWidth: 456, axisMax: 6 };
    expect(axisX(0, axis)).toBe(12);
    expect(axisX(3, axis)).toBeCloseTo(12 + 228, 9);
    expect(axisX(6, axis)).toBe(468);
    expect(axisX(9, axis)).toBe(468);
    expect(axisX(-1, axis)).toBe(12);
  });

  it("labels both periods with their figures, or says there are none", () => {
    const result = comparePeriods(twoPhaseSnapshot(), FIXTURE_SETTINGS, {
      a: parseDateRange("2026-09-01..2026-09-28"),
      b: parseDateRange("2026-11-03..2026-11-30"),
    });
    const svg = compareChart(result);
    expect(svg).toContain("A 2026-09-01..2026-09-28: no figures");
    const ev = result.b.report.effectiveVoices;
    expect(ev).not.toBeNull();
    expect(svg).toContain(
      `B 2026-11-03..2026-11-30: ${decimal1(ev?.value ?? 0)} (${decimal1(ev?.low ?? 0)}–${decimal1(ev?.high ?? 0)})`,
    );
    expect(svg.match(/<g class="period-mark">/g)?.length).toBe(2);
  });
});
