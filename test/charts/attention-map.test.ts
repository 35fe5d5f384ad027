/**
 * Attention map geometry: points on a circle (equal spacing gives chord 2R·sin(π/n), the chord
 * length formula of elementary geometry), node area proportional to share, arrow weights equal to
 * the counted part of each row of A (DESIGN.md §4 step 4: C_ij / (c_i + β)), labels on every node,
 * names only by the naming rules.
 */
import { describe, expect, it } from "vitest";
import {
  arrowGeometry,
  arrowWidth,
  attentionEdges,
  attentionMapChart,
  circlePositions,
  nodeRadius,
} from "../../src/report/charts/attention-map.js";
import { percent } from "../../src/report/format.js";
import { COUNTED_IDS, fixtureAnalysis, NAMED_IDS } from "./chart-fixtures.js";

describe("attention map geometry", () => {
  it("places n members evenly on the circle, the first at the top", () => {
    const circle = { cx: 100, cy: 120, radius: 50 };
    for (const n of [3, 5, 8, 13]) {
      const at = circlePositions(n, circle);
      expect(at[0].x).toBeCloseTo(100, 9);
      expect(at[0].y).toBeCloseTo(70, 9);
      for (let k = 0; k < n; k++) {
        const p = at[k];
        const q = at[(k + 1) % n];
        expect(Math.hypot(p.x - circle.cx, p.y - circle.cy)).toBeCloseTo(50, 9);
        expect(Math.hypot(p.x - q.x, p.y - q.y)).toBeCloseTo(2 * 50 * Math.sin(Math.PI / n), 9);
      }
      // clockwise on screen (y grows downward): the second point lies right of the first
      expect(at[1].x).toBeGreaterThan(at[0].x);
    }
  });

  it("makes node area proportional to share above the minimum radius", () => {
    const big = nodeRadius(0.4, 0.4);
    const quarter = nodeRadius(0.1, 0.4);
    expect(big).toBe(30);
    expect((quarter * quarter) / (big * big)).toBeCloseTo(0.25, 12);
    expect(nodeRadius(0.0001, 0.4)).toBe(6);
  });

  it("gives arrows the counted part of each row of A", () => {
    // Hand-made counts: row 0 → [0, 3, 1], row 1 → [2, 0, 0], row 2 → nothing. β = 1.
    const input = {
      counts: {
        members: ["a", "b", "c"],
        rowPtr: Int32Array.from([0, 2, 3, 3]),
        colIdx: Int32Array.from([1, 2, 0]),
        values: Float64Array.from([3, 1, 2]),
      },
      signals: 6,
      closedGroups: [[0, 1, 2]],
      named: [true, true, true],
      labels: [null, null, null],
      clusters: null,
    };
    const edges = attentionEdges({ input, background: 1, shown: ["b", "a", "c"], minWeight: 0 });
    // a→b: 3 / (4 + 1) = 0.6; b→a: 2 / (2 + 1); a→c: 1 / 5 = 0.2. Indices are in shown order.
    expect(edges).toEqual([
      { from: 0, to: 1, weight: 2 / 3 },
      { from: 1, to: 0, weight: 0.6 },
      { from: 1, to: 2, weight: 0.2 },
    ]);
    expect(
      attentionEdges({ input, background: 1, shown: ["b", "a"], minWeight: 0.5 }),
    ).toHaveLength(2);
    expect(arrowWidth(0.6, 0.6)).toBe(9);
    expect(arrowWidth(0.3, 0.6)).toBeCloseTo(5.25, 12);
  });

  it("starts and ends arrows outside both nodes", () => {
    const from = { x: 0, y: 0 };
    const to = { x: 100, y: 0 };
    const g = arrowGeometry({ from, to, rFrom: 10, rTo: 20 });
    expect(Math.hypot(g.start.x - from.x, g.start.y - from.y)).toBeGreaterThan(10);
    expect(Math.hypot(g.end.x - to.x, g.end.y - to.y)).toBeGreaterThan(20);
    // The opposite direction bends to the other side.
    const back = arrowGeometry({ from: to, to: from, rFrom: 20, rTo: 10 });
    expect(Math.sign(g.control.y)).toBe(-Math.sign(back.control.y));
  });
});

describe("attention map chart", () => {
  const { report, input } = fixtureAnalysis();

  it("labels every member with its share and every arrow with its weight", () => {
    const svg = attentionMapChart({ report, input, policy: { namesOn: true } }) ?? "";
    const influence = report.influence ?? [];
    expect(svg.match(/<g class="node">/g)?.length).toBe(influence.length);
    influence.forEach((e, k) => {
      expect(svg).toContain(`>${e.named ? e.member : `member ${k + 1}`}</text>`);
      expect(svg).toContain(`>${percent(e.share)}</text>`);
    });
    const arrows = svg.match(/<g class="arrow">/g)?.length ?? 0;
    expect(arrows).toBeGreaterThan(0);
    expect(svg.match(/class="arrow-label"/g)?.length).toBe(arrows);
  });

  it("never shows a counted member's id", () => {
    for (const namesOn of [true, false]) {
      const svg = attentionMapChart({ report, input, policy: { namesOn } }) ?? "";
      for (const id of COUNTED_IDS) expect(svg).not.toContain(id);
      for (const id of NAMED_IDS) expect(svg.includes(id)).toBe(namesOn);
    }
  });
});
