/**
 * Trend charts: the week ends, the y mapping from a zero baseline, gaps where a week had no
 * figure, the band between each point's interval ends, and the weekly series equal to the report a
 * digest would have shown at each week's end.
 */
import { describe, expect, it } from "vitest";
import { analyzeSnapshot } from "../../src/analysis/analyze-snapshot.js";
import { DAY_MS } from "../../src/domain/settings.js";
import { bandLineChart, bandLineLayout } from "../../src/report/charts/band-line-chart.js";
import { weekEnds, weeklySeries } from "../../src/report/charts/weekly-series.js";
import { decimal1 } from "../../src/report/format.js";
import { FIXTURE_SETTINGS, twoPhaseSnapshot } from "./chart-fixtures.js";

describe("band line layout", () => {
  const points = [
    { label: "w1", value: 2, low: 1, high: 3 },
    { label: "w2", value: null, low: null, high: null },
    { label: "w3", value: 4, low: 3, high: 5 },
    { label: "w4", value: 5, low: 4, high: 6 },
  ];

  it("maps values linearly from the plot's bottom and spaces weeks evenly", () => {
    const layout = bandLineLayout(points, { yMax: 8 });
    const { plot } = layout;
    const bottom = plot.y + plot.height;
    expect(layout.points[0].y).toBeCloseTo(bottom - (2 / 8) * plot.height, 9);
    expect(layout.points[3].highY).toBeCloseTo(bottom - (6 / 8) * plot.height, 9);
    expect(layout.points[0].x).toBe(plot.x);
    expect(layout.points[3].x).toBeCloseTo(plot.x + plot.width, 9);
    expect(layout.points[2].x - layout.points[1].x).toBeCloseTo(plot.width / 3, 9);
    expect(layout.yTicks.map((t) => t.value)).toEqual([0, 2, 4, 6, 8]);
    for (const p of layout.points) {
      if (p.lowY === null || p.highY === null || p.y === null) continue;
      expect(p.highY).toBeLessThanOrEqual(p.y);
      expect(p.lowY).toBeGreaterThanOrEqual(p.y);
      expect(p.highY).toBeGreaterThanOrEqual(plot.y);
      expect(p.lowY).toBeLessThanOrEqual(bottom);
    }
  });

  it("splits the line at weeks without a figure", () => {
    expect(bandLineLayout(points, { yMax: 8 }).runs).toEqual([[0], [2, 3]]);
  });

  it("labels every point with its value and marks gaps", () => {
    const svg = bandLineChart({
      kind: "t",
      title: "T",
      description: "D",
      points,
      yMax: 8,
      format: decimal1,
    });
    for (const v of ["2.0", "4.0", "5.0"]) expect(svg).toContain(`>${v}</text>`);
    expect(svg.match(/<circle class="point"/g)?.length).toBe(3);
    expect(svg.match(/<polyline class="trend"/g)?.length).toBe(1);
    expect(svg).toContain(">–</text>");
  });
});

describe("weekly series", () => {
  it("steps back 7 days from until and stops at the first event", () => {
    const until = Date.UTC(2026, 10, 29);
    expect(weekEnds({ first: until - 15 * DAY_MS, until, maxWeeks: 13 })).toEqual([
      until - 14 * DAY_MS,
      until - 7 * DAY_MS,
      until,
    ]);
    expect(weekEnds({ first: 0, until, maxWeeks: 2 })).toEqual([until - 7 * DAY_MS, until]);
    expect(weekEnds({ first: until + 1, until, maxWeeks: 4 })).toEqual([until]);
  });

  it("gives each week the figures of the report at that week's end", () => {
    // The fixture's activity twice, 14 days apart: weeks end at until, until − 7 d, until − 14 d.
    const snapshot = twoPhaseSnapshot();
    const until = (snapshot.lastEventAt ?? 0) + DAY_MS;
    const series = weeklySeries(snapshot, FIXTURE_SETTINGS, { until });
    expect(series.map((p) => p.until)).toEqual([until - 14 * DAY_MS, until - 7 * DAY_MS, until]);
    for (const point of series) {
      const report = analyzeSnapshot(snapshot, FIXTURE_SETTINGS, { until: point.until });
      expect(point.effectiveVoices).toEqual(report.effectiveVoices);
      expect(point.top?.share ?? null).toBe(report.top?.share ?? null);
      expect(point.members).toBe(report.members);
      expect(point.effectiveVoices).not.toBeNull();
    }
    // Twice the signals at the end: the last week's interval is narrower than the first's.
    const width = (k: number) =>
      (series[k].effectiveVoices?.high ?? 0) - (series[k].effectiveVoices?.low ?? 0);
    expect(width(2)).toBeLessThan(width(0));
  });
});
