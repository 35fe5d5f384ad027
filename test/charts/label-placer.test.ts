/**
 * The greedy label placer (after Christensen, Marks & Shieber 1995, "An empirical study of
 * algorithms for point-feature label placement", ACM TOG 14(3):203–232): whatever the input, no two
 * placed labels overlap, none covers an obstacle or leaves the bounds (checked pairwise here,
 * independently of the placer's own bookkeeping); earlier labels win; a label without room is
 * dropped. Also the text helpers: shortening with "…", and axis ticks that end on the maximum.
 */
import fc from "fast-check";
import { describe, expect, it } from "vitest";
import { ticksUpTo } from "../../src/report/charts/band-line-chart.js";
import { boxesOverlap, placeLabels } from "../../src/report/charts/label-placer.js";
import { fitText, textBox, textWidth } from "../../src/report/charts/text-metrics.js";

const box = fc.record({
  x: fc.double({ min: 0, max: 300, noNaN: true }),
  y: fc.double({ min: 0, max: 200, noNaN: true }),
  width: fc.double({ min: 1, max: 60, noNaN: true }),
  height: fc.double({ min: 1, max: 20, noNaN: true }),
});

function intersects(a: { x: number; y: number; width: number; height: number }, b: typeof a) {
  const dx = Math.min(a.x + a.width, b.x + b.width) - Math.max(a.x, b.x);
  const dy = Math.min(a.y + a.height, b.y + b.height) - Math.max(a.y, b.y);
  return dx > 0 && dy > 0;
}

describe("label placer", () => {
  const bounds = { x: 0, y: 0, width: 360, height: 220 };

  it("never places two labels, or a label and an obstacle, over each other", () => {
    fc.assert(
      fc.property(
        fc.array(fc.array(box, { minLength: 1, maxLength: 4 }), { minLength: 1, maxLength: 30 }),
        fc.array(box, { maxLength: 8 }),
        (labels, obstacles) => {
          const placed = placeLabels({
            labels: labels.map((cands) => cands.map((b) => ({ boxes: [b], value: b }))),
            obstacles,
            bounds,
            gap: 0,
          });
          const chosen = placed.filter((p) => p !== null);
          for (let i = 0; i < chosen.length; i++) {
            const a = chosen[i];
            expect(a.x >= 0 && a.y >= 0 && a.x + a.width <= 360 && a.y + a.height <= 220).toBe(
              true,
            );
            for (const o of obstacles) expect(intersects(a, o)).toBe(false);
            for (let j = i + 1; j < chosen.length; j++)
              expect(intersects(a, chosen[j])).toBe(false);
          }
          // The first label gets its first candidate that is free of obstacles and inside.
          const first = labels[0].find(
            (b) =>
              b.x + b.width <= 360 &&
              b.y + b.height <= 220 &&
              obstacles.every((o) => !boxesOverlap(b, o, 0)),
          );
          expect(placed[0]).toEqual(first ?? null);
        },
      ),
    );
  });

  it("drops a label that has no free candidate and keeps the rest", () => {
    const a = { x: 10, y: 10, width: 40, height: 12 };
    const placed = placeLabels({
      labels: [
        [{ boxes: [a], value: "a" }],
        [{ boxes: [{ ...a, x: 30 }], value: "b-first" }],
        [
          { boxes: [{ ...a, x: 20 }], value: "c-first" },
          { boxes: [{ ...a, y: 40 }], value: "c-second" },
        ],
      ],
      bounds,
    });
    expect(placed).toEqual(["a", null, "c-second"]);
  });
});

describe("text helpers", () => {
  it("shortens a label with … to fit, and leaves short ones alone", () => {
    expect(fitText("member 3", 14, 200)).toBe("member 3");
    const cut = fitText("a-very-long-platform-display-name", 14, 120, "bold");
    expect(cut.endsWith("…")).toBe(true);
    expect(textWidth(cut, 14, "bold")).toBeLessThanOrEqual(120);
    // DejaVu Sans digits are 0.636 em wide (1303/2048 units), so "00" at 10 px is 12.72 px.
    expect(textWidth("00", 10)).toBeCloseTo(12.72, 9);
    const b = textBox({ x: 100, y: 50, content: "00", size: 10, anchor: "end" });
    expect(b.x + b.width).toBeCloseTo(100, 9);
    expect(b.height).toBeCloseTo(11.7, 9);
  });

  it("ends axis ticks on the maximum and drops a step too close to it", () => {
    expect(ticksUpTo(13, 5)).toEqual([0, 5, 10, 13]);
    expect(ticksUpTo(12, 5)).toEqual([0, 5, 12]);
    expect(ticksUpTo(60, 10)).toEqual([0, 10, 20, 30, 40, 50, 60]);
  });
});
