/**
 * Share bars: bar length proportional to the share on a common axis from 0 (position on a common
 * scale, Cleveland & McGill 1984, "Graphical perception", JASA 79:531–554), whiskers inside the
 * axis and around the bar's end, the line across, a label for every member shown, names only by
 * the naming rules.
 */
import fc from "fast-check";
import { describe, expect, it } from "vitest";
import {
  shareAxisMax,
  shareBarsChart,
  shareBarsLayout,
} from "../../src/report/charts/share-bars-chart.js";
import { percent, percentRange } from "../../src/report/format.js";
import { COUNTED_IDS, fixtureAnalysis, NAMED_IDS } from "./chart-fixtures.js";

const shareRow = fc
  .tuple(
    fc.double({ min: 0, max: 1, noNaN: true }),
    fc.double({ min: 0, max: 1, noNaN: true }),
    fc.double({ min: 0, max: 1, noNaN: true }),
  )
  .map(([a, b, c]) => {
    const [low, share, high] = [a, b, c].sort((x, y) => x - y);
    return { label: "m", share, low, high };
  });

describe("share bars layout", () => {
  it("makes every bar length proportional to its share, with intervals inside the axis", () => {
    fc.assert(
      fc.property(
        fc.array(shareRow, { minLength: 1, maxLength: 25 }),
        fc.option(fc.double({ min: 0.05, max: 0.95, noNaN: true })),
        (rows, line) => {
          const layout = shareBarsLayout(rows, { line });
          const scale = layout.plotWidth / layout.axisMax;
          expect(layout.axisMax).toBeGreaterThanOrEqual(
            Math.max(...rows.map((r) => r.high)) - 1e-12,
          );
          layout.bars.forEach((b, k) => {
            expect(b.barX).toBe(layout.plotX);
            expect(b.barWidth).toBeCloseTo(rows[k].share * scale, 9);
            expect(b.lowX).toBeGreaterThanOrEqual(layout.plotX);
            expect(b.highX).toBeLessThanOrEqual(layout.plotX + layout.plotWidth + 1e-9);
            expect(b.lowX).toBeLessThanOrEqual(b.barX + b.barWidth + 1e-9);
            expect(b.highX).toBeGreaterThanOrEqual(b.barX + b.barWidth - 1e-9);
          });
          if (line !== null) {
            expect(layout.lineX).toBeCloseTo(layout.plotX + line * scale, 9);
          }
        },
      ),
    );
  });

  it("ends the axis on a 10% step above the largest interval end or the line", () => {
    expect(shareAxisMax([{ label: "a", share: 0.31, low: 0.24, high: 0.38 }], 0.3)).toBeCloseTo(
      0.5,
      12,
    );
    expect(shareAxisMax([{ label: "a", share: 0.1, low: 0.05, high: 0.12 }], 0.3)).toBeCloseTo(
      0.4,
      12,
    );
    expect(shareAxisMax([{ label: "a", share: 0.9, low: 0.8, high: 0.99 }], null)).toBe(1);
  });
});

describe("share bars chart", () => {
  const { report } = fixtureAnalysis();
  const influence = report.influence ?? [];

  it("labels every member shown with its share and interval", () => {
    const svg = shareBarsChart(report, { namesOn: true }) ?? "";
    expect(influence.length).toBe(6);
    expect(svg.match(/<rect class="share"/g)?.length).toBe(influence.length);
    influence.forEach((e, k) => {
      // The SVG escapes "<" (as in "<1%") as &lt;.
      const shown = `${percent(e.share)} (${percentRange(e.low, e.high)})`.replaceAll("<", "&lt;");
      expect(svg).toContain(shown);
      const label = e.named ? e.member : `member ${k + 1}`;
      expect(svg).toContain(`>${label}</text>`);
    });
    expect(svg).toContain(`line ${percent(report.line?.threshold ?? 0)}`);
  });

  it("never shows a counted member's id, and names nobody with names off", () => {
    const on = shareBarsChart(report, { namesOn: true }) ?? "";
    const off = shareBarsChart(report, { namesOn: false }) ?? "";
    for (const id of COUNTED_IDS) {
      expect(on).not.toContain(id);
      expect(off).not.toContain(id);
    }
    for (const id of NAMED_IDS) {
      expect(on).toContain(id);
      expect(off).not.toContain(id);
    }
  });

  it("shows the reader their own bar as you", () => {
    const svg = shareBarsChart(report, { namesOn: false, reader: "zq-counted-3" }) ?? "";
    expect(svg).toContain("you (zq-counted-3)");
    expect(svg).not.toContain("zq-counted-1");
  });

  it("is responsive: a viewBox and max-width 100%", () => {
    const svg = shareBarsChart(report, { namesOn: false }) ?? "";
    expect(svg).toMatch(/^<svg [^>]*viewBox="0 0 460 \d+"/);
    expect(svg).toContain("max-width:100%");
  });
});
