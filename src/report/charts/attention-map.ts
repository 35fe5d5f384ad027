/**
 * @module attention-map
 * The attention map: members on a circle in share order (largest at the top, clockwise), each
 * node's area proportional to its influence share, and an arrow from A to B whose width grows with
 * the counted part of A's attention that goes to B, C_AB / (c_A + β) (DESIGN.md §4 step 4, without
 * the even background part every pair shares). Two directions of a pair bend to opposite sides so
 * both stay visible. Every node and every drawn arrow carries a text label. Circular layouts are
 * common practice for small directed networks; areas, not radii, scale with the value
 * (Cleveland & McGill 1984, "Graphical perception", JASA 79:531–554).
 */
import type { AttentionInput } from "../../domain/counts.js";
import type { AnalysisReport } from "../../domain/report.js";
import { percent } from "../format.js";
import { memberLabeller, type NamingPolicy } from "../naming.js";
import { CHART_COLOURS } from "./palette.js";
import { escapeXml, num, svgFrame, text } from "./svg.js";

export interface Point {
  readonly x: number;
  readonly y: number;
}

/** n positions on a circle, the first at the top, going clockwise. */
export function circlePositions(
  n: number,
  circle: { cx: number; cy: number; radius: number },
): Point[] {
  return Array.from({ length: n }, (_, k) => {
    const angle = -Math.PI / 2 + (2 * Math.PI * k) / Math.max(1, n);
    return {
      x: circle.cx + circle.radius * Math.cos(angle),
      y: circle.cy + circle.radius * Math.sin(angle),
    };
  });
}

/** Node radius with area proportional to share: r = rMax · sqrt(share / maxShare), at least rMin. */
export function nodeRadius(
  share: number,
  maxShare: number,
  limits = { rMin: 6, rMax: 30 },
): number {
  if (maxShare <= 0) return limits.rMin;
  return Math.max(limits.rMin, limits.rMax * Math.sqrt(Math.max(0, share) / maxShare));
}

export interface AttentionEdge {
  /** Indices into the shown members (share order). */
  readonly from: number;
  readonly to: number;
  /** Counted part of the row's attention, C_ij / (c_i + β), in [0, 1). */
  readonly weight: number;
}

/**
 * The arrows to draw among the shown members: counted attention of at least `minWeight`, the
 * heaviest `maxEdges` of them, heaviest first.
 */
export function attentionEdges(args: {
  input: AttentionInput;
  background: number;
  /** Member ids in the order shown. */
  shown: readonly string[];
  minWeight?: number;
  maxEdges?: number;
}): AttentionEdge[] {
  const { counts } = args.input;
  const place = new Map(args.shown.map((id, k) => [id, k]));
  const edges: AttentionEdge[] = [];
  for (let i = 0; i < counts.members.length; i++) {
    const from = place.get(counts.members[i]);
    if (from === undefined) continue;
    let rowSum = 0;
    for (let e = counts.rowPtr[i]; e < counts.rowPtr[i + 1]; e++) rowSum += counts.values[e];
    for (let e = counts.rowPtr[i]; e < counts.rowPtr[i + 1]; e++) {
      const to = place.get(counts.members[counts.colIdx[e]]);
      if (to === undefined) continue;
      const weight = counts.values[e] / (rowSum + args.background);
      if (weight >= (args.minWeight ?? 0.15)) edges.push({ from, to, weight });
    }
  }
  edges.sort((a, b) => b.weight - a.weight || a.from - b.from || a.to - b.to);
  return edges.slice(0, args.maxEdges ?? 24);
}

/** Arrow width: 1.5 px at weight 0 up to 9 px at the heaviest drawn weight. */
export function arrowWidth(weight: number, maxWeight: number): number {
  return maxWeight <= 0 ? 1.5 : 1.5 + 7.5 * (weight / maxWeight);
}

/**
 * A curved arrow from the rim of one node to the rim of another: quadratic Bézier bent by `bend`
 * (a fraction of the distance) to the right of the direction of travel, its head at `end`.
 */
export function arrowGeometry(args: {
  from: Point;
  to: Point;
  rFrom: number;
  rTo: number;
  bend?: number;
  head?: number;
}) {
  const dx = args.to.x - args.from.x;
  const dy = args.to.y - args.from.y;
  const d = Math.hypot(dx, dy) || 1;
  const ux = dx / d;
  const uy = dy / d;
  const bend = (args.bend ?? 0.12) * d;
  const control = {
    x: (args.from.x + args.to.x) / 2 - uy * bend,
    y: (args.from.y + args.to.y) / 2 + ux * bend,
  };
  const toward = (p: Point, q: Point, r: number): Point => {
    const l = Math.hypot(q.x - p.x, q.y - p.y) || 1;
    return { x: p.x + ((q.x - p.x) / l) * r, y: p.y + ((q.y - p.y) / l) * r };
  };
  const start = toward(args.from, control, args.rFrom + 2);
  const end = toward(args.to, control, args.rTo + 3);
  const head = args.head ?? 10;
  const hx = end.x - control.x;
  const hy = end.y - control.y;
  const hl = Math.hypot(hx, hy) || 1;
  const bx = end.x - (hx / hl) * head;
  const by = end.y - (hy / hl) * head;
  const px = (-hy / hl) * head * 0.5;
  const py = (hx / hl) * head * 0.5;
  const mid = {
    x: 0.25 * start.x + 0.5 * control.x + 0.25 * end.x,
    y: 0.25 * start.y + 0.5 * control.y + 0.25 * end.y,
  };
  return {
    start,
    control,
    end,
    base: { x: bx, y: by },
    headPoints: [end, { x: bx + px, y: by + py }, { x: bx - px, y: by - py }] as const,
    mid,
  };
}

/** The attention map of a report; null without shares. Shows at most `maxMembers` largest shares. */
export function attentionMapChart(args: {
  report: AnalysisReport;
  input: AttentionInput;
  policy: NamingPolicy;
  maxMembers?: number;
}): string | null {
  const { report } = args;
  if (!report.influence || report.influence.length === 0) return null;
  const label = memberLabeller(report.influence, args.policy);
  const shown = report.influence.slice(0, args.maxMembers ?? 16);
  const width = 620;
  const height = 560;
  const centre = { cx: width / 2, cy: height / 2, radius: 165 };
  const at = circlePositions(shown.length, centre);
  const maxShare = Math.max(...shown.map((e) => e.share));
  const radii = shown.map((e) => nodeRadius(e.share, maxShare));
  const edges = attentionEdges({
    input: args.input,
    background:
      typeof report.settings.background === "number"
        ? report.settings.background
        : (report.settings.priorStrength ?? 0),
    shown: shown.map((e) => e.member),
  });
  const maxWeight = edges.length > 0 ? edges[0].weight : 0;
  const c = CHART_COLOURS;
  const arrows: string[] = [];
  const arrowLabels: string[] = [];
  for (const e of [...edges].reverse()) {
    const g = arrowGeometry({
      from: at[e.from],
      to: at[e.to],
      rFrom: radii[e.from],
      rTo: radii[e.to],
    });
    const w = arrowWidth(e.weight, maxWeight);
    arrows.push(
      `<g class="arrow"><title>${escapeXml(label(shown[e.from].member))} → ${escapeXml(label(shown[e.to].member))}: ${percent(e.weight)} of counted attention</title>`,
      `<path d="M${num(g.start.x)},${num(g.start.y)} Q${num(g.control.x)},${num(g.control.y)} ${num(g.base.x)},${num(g.base.y)}" fill="none" stroke="${c.attention}" stroke-opacity="0.8" stroke-width="${num(w)}" stroke-linecap="round"/>`,
      `<polygon points="${g.headPoints.map((p) => `${num(p.x)},${num(p.y)}`).join(" ")}" fill="${c.attention}"/></g>`,
    );
    arrowLabels.push(
      `<text class="arrow-label" x="${num(g.mid.x)}" y="${num(g.mid.y + 4)}" text-anchor="middle" font-size="11" fill="${c.ink}" stroke="#ffffff" stroke-width="3" paint-order="stroke">${percent(e.weight)}</text>`,
    );
  }
  const nodes = shown.map((e, k) => {
    const p = at[k];
    const angle = Math.atan2(p.y - centre.cy, p.x - centre.cx);
    const reach = radii[k] + 12;
    const lx = p.x + Math.cos(angle) * reach;
    const ly = p.y + Math.sin(angle) * reach;
    const cos = Math.cos(angle);
    const anchor = cos > 0.3 ? "start" : cos < -0.3 ? "end" : "middle";
    const dy = Math.sin(angle) > 0.3 ? 14 : Math.sin(angle) < -0.3 ? -18 : -2;
    const fill = report.line && e.share >= report.line.threshold ? c.line : c.share;
    return [
      `<g class="node"><circle cx="${num(p.x)}" cy="${num(p.y)}" r="${num(radii[k])}" fill="${fill}" stroke="#ffffff" stroke-width="2"/>`,
      text({
        x: lx,
        y: ly + dy,
        content: label(e.member),
        anchor,
        size: 13,
        weight: "bold",
        fill: c.ink,
      }),
      text({ x: lx, y: ly + dy + 15, content: percent(e.share), anchor, size: 12, fill: c.ink }),
      "</g>",
    ].join("");
  });
  const more = report.influence.length - shown.length;
  return svgFrame({
    kind: "attention-map",
    width,
    height,
    title: "Attention map",
    description: `Members on a circle, largest influence share at the top; node area shows the share. An arrow from A to B shows the part of A's counted attention (replies and mentions) that goes to B; arrows under 15% are left out, at most 24 drawn.${more > 0 ? ` ${more} members with smaller shares not shown.` : ""}`,
    body: arrows.join("") + arrowLabels.join("") + nodes.join(""),
  });
}
