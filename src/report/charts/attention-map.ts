/**
 * @module attention-map
 * The attention map: members on a circle in share order (largest at the top, clockwise), each
 * node's area proportional to its influence share, and an arrow from A to B whose width grows with
 * the counted part of A's attention that goes to B, C_AB / (c_A + β) (DESIGN.md §4 step 4, without
 * the even background part every pair shares). Two directions of a pair bend to opposite sides so
 * both stay visible. Every node and every drawn arrow carries a text label. Circular layouts are
 * common practice for small directed networks; areas, not radii, scale with the value
 * (Cleveland & McGill 1984, "Graphical perception", JASA 79:531–554). A visible title and a legend
 * explain the arrows, the node sizes and colours. Member labels are placed first, each radially
 * outside its node or further out with a leader line; arrow labels follow, heaviest first, at the
 * first free spot along their curve. A label with no free spot is left out of the drawing and kept
 * in its mark's `<title>` and in the table beside the map (the greedy placer of label-placer.ts).
 */
import type { AttentionInput } from "../../domain/counts.js";
import type { AnalysisReport } from "../../domain/report.js";
import { percent } from "../format.js";
import { memberLabeller, type NamingPolicy } from "../naming.js";
import { type LabelCandidate, placeLabels } from "./label-placer.js";
import { CHART_COLOURS } from "./palette.js";
import { chartTitle, escapeXml, legend, MIN_FONT, num, svgFrame, text } from "./svg.js";
import { type Box, textBox } from "./text-metrics.js";

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

/** The point at t ∈ [0, 1] on an arrow's quadratic Bézier curve (start, control, base of head). */
export function curvePoint(g: ReturnType<typeof arrowGeometry>, t: number): Point {
  const u = 1 - t;
  return {
    x: u * u * g.start.x + 2 * u * t * g.control.x + t * t * g.base.x,
    y: u * u * g.start.y + 2 * u * t * g.control.y + t * t * g.base.y,
  };
}

/** What the map shows, for the SVG, its table and the narrow-screen list alike. */
export interface AttentionMapData {
  readonly members: readonly {
    readonly label: string;
    readonly share: number;
    readonly aboveLine: boolean;
  }[];
  readonly edges: readonly AttentionEdge[];
  /** Members with shares too small to be shown. */
  readonly notShown: number;
  readonly line: number | null;
}

/** Default number of members drawn on the map. */
export const MAP_MAX_MEMBERS = 16;
/** Default number of arrows drawn. */
export const MAP_MAX_ARROWS = 20;
/** Counted attention below this part of a row gets no arrow. */
export const MAP_MIN_WEIGHT = 0.15;

/** The members and arrows of a report's map, labelled by the naming rules; null without shares. */
export function attentionMapData(args: {
  report: AnalysisReport;
  input: AttentionInput;
  policy: NamingPolicy;
  maxMembers?: number;
}): AttentionMapData | null {
  const { report } = args;
  if (!report.influence || report.influence.length === 0) return null;
  const label = memberLabeller(report.influence, args.policy);
  const shown = report.influence.slice(0, args.maxMembers ?? MAP_MAX_MEMBERS);
  const line = report.line?.threshold ?? null;
  return {
    members: shown.map((e) => ({
      label: label(e.member),
      share: e.share,
      aboveLine: line !== null && e.share >= line,
    })),
    edges: attentionEdges({
      input: args.input,
      background:
        typeof report.settings.background === "number"
          ? report.settings.background
          : (report.settings.priorStrength ?? 0),
      shown: shown.map((e) => e.member),
      minWeight: MAP_MIN_WEIGHT,
      maxEdges: MAP_MAX_ARROWS,
    }),
    notShown: report.influence.length - shown.length,
    line,
  };
}

interface NodeLabel {
  readonly lines: readonly {
    readonly x: number;
    readonly y: number;
    readonly content: string;
    readonly bold: boolean;
  }[];
  readonly anchor: "start" | "middle" | "end";
  readonly leader: {
    readonly x1: number;
    readonly y1: number;
    readonly x2: number;
    readonly y2: number;
  } | null;
}

/** The attention map of a report; null without shares. Shows at most `maxMembers` largest shares. */
export function attentionMapChart(args: {
  report: AnalysisReport;
  input: AttentionInput;
  policy: NamingPolicy;
  maxMembers?: number;
}): string | null {
  const data = attentionMapData(args);
  if (data === null) return null;
  const c = CHART_COLOURS;
  const width = 600;
  const heading = chartTitle("Attention map: who listens to whom");
  const key = legend(
    [
      {
        swatch: `<path d="M1,7 L14,7" stroke="${c.attention}" stroke-width="3"/><polygon points="22,7 13,2.5 13,11.5" fill="${c.attention}"/>`,
        label: "A → B: part of A's replies and mentions that go to B",
      },
      {
        swatch: `<circle cx="11" cy="7" r="6.5" fill="${c.share}"/>`,
        label: "node area: influence share",
      },
      ...(data.line === null
        ? []
        : [
            {
              swatch: `<circle cx="11" cy="7" r="6.5" fill="${c.line}"/>`,
              label: `at or above the line (${percent(data.line)})`,
            },
          ]),
    ],
    { x: 10, y: heading.bottom + 6, maxWidth: width - 20 },
  );
  const top = key.bottom + 8;
  const ring = 175;
  const centre = { cx: width / 2, cy: top + ring + 70, radius: ring };
  const height = centre.cy + ring + 70;
  const n = data.members.length;
  const at = circlePositions(n, centre);
  const maxShare = Math.max(...data.members.map((m) => m.share));
  const radii = data.members.map((m) => nodeRadius(m.share, maxShare, { rMin: 6, rMax: 28 }));
  const bounds: Box = { x: 2, y: top, width: width - 4, height: height - top - 2 };
  const nodeBoxes: Box[] = at.map((p, k) => ({
    x: p.x - radii[k] - 1,
    y: p.y - radii[k] - 1,
    width: 2 * radii[k] + 2,
    height: 2 * radii[k] + 2,
  }));
  // Member labels: name over share, outside the node along its radius; further out with a leader.
  const nodeRequests = data.members.map((m, k): LabelCandidate<NodeLabel>[] => {
    const p = at[k];
    const angle = Math.atan2(p.y - centre.cy, p.x - centre.cx);
    const cos = Math.cos(angle);
    const sin = Math.sin(angle);
    const anchor = cos > 0.35 ? "start" : cos < -0.35 ? "end" : "middle";
    const share = percent(m.share);
    const candidates: LabelCandidate<NodeLabel>[] = [];
    for (const extra of [6, 22, 40]) {
      for (const shift of [0, -14, 14]) {
        const reach = radii[k] + extra;
        const ex = p.x + cos * reach;
        const ey = p.y + sin * reach;
        // Two lines (13 px): the pair is 31 px tall; put it beside, above or below the point.
        const blockTop = sin > 0.35 ? ey : sin < -0.35 ? ey - 31 : ey - 15.5;
        const x = anchor === "middle" ? ex + shift : ex;
        const y0 = blockTop + shift * (anchor === "middle" ? 0 : 1) + 12;
        const lines = [
          { x, y: y0, content: m.label, bold: true },
          { x, y: y0 + 16, content: share, bold: false },
        ];
        const boxes = lines.map((l) =>
          textBox({
            x: l.x,
            y: l.y,
            content: l.content,
            size: MIN_FONT,
            anchor,
            weight: l.bold ? "bold" : "normal",
          }),
        );
        const leader =
          extra > 6
            ? {
                x1: p.x + cos * (radii[k] + 2),
                y1: p.y + sin * (radii[k] + 2),
                x2: p.x + cos * (reach - 3),
                y2: p.y + sin * (reach - 3),
              }
            : null;
        candidates.push({ boxes, value: { lines, anchor, leader } });
      }
    }
    return candidates;
  });
  const nodeLabels = placeLabels({ labels: nodeRequests, obstacles: nodeBoxes, bounds, gap: 2 });
  const placedBoxes: Box[] = [...nodeBoxes];
  nodeLabels.forEach((l) => {
    if (!l) return;
    for (const line of l.lines) {
      placedBoxes.push(
        textBox({
          x: line.x,
          y: line.y,
          content: line.content,
          size: MIN_FONT,
          anchor: l.anchor,
          weight: line.bold ? "bold" : "normal",
        }),
      );
    }
  });
  // Arrows, and their labels heaviest first at the first free spot along the curve.
  const maxWeight = data.edges.length > 0 ? data.edges[0].weight : 0;
  const geometry = data.edges.map((e) =>
    arrowGeometry({ from: at[e.from], to: at[e.to], rFrom: radii[e.from], rTo: radii[e.to] }),
  );
  const arrowLabels = placeLabels({
    labels: data.edges.map((e, i) =>
      [0.5, 0.4, 0.6, 0.3, 0.7, 0.2, 0.8].map((t) => {
        const p = curvePoint(geometry[i], t);
        const label = {
          x: p.x,
          y: p.y + 4.5,
          content: percent(e.weight),
          size: MIN_FONT,
          anchor: "middle" as const,
        };
        return { boxes: [textBox(label)], value: label };
      }),
    ),
    obstacles: placedBoxes,
    bounds,
    gap: 1,
  });
  const arrows: string[] = [];
  const labels: string[] = [];
  for (let i = data.edges.length - 1; i >= 0; i--) {
    const e = data.edges[i];
    const g = geometry[i];
    const w = arrowWidth(e.weight, maxWeight);
    arrows.push(
      `<g class="arrow"><title>${escapeXml(data.members[e.from].label)} → ${escapeXml(data.members[e.to].label)}: ${percent(e.weight)} of counted attention</title>`,
      `<path d="M${num(g.start.x)},${num(g.start.y)} Q${num(g.control.x)},${num(g.control.y)} ${num(g.base.x)},${num(g.base.y)}" fill="none" stroke="${c.attention}" stroke-width="${num(w)}" stroke-linecap="round"/>`,
      `<polygon points="${g.headPoints.map((p) => `${num(p.x)},${num(p.y)}`).join(" ")}" fill="${c.attention}"/></g>`,
    );
    const label = arrowLabels[i];
    if (label) {
      labels.push(text({ ...label, fill: c.ink, className: "arrow-label", halo: true }));
    }
  }
  const nodes = data.members.map((m, k) => {
    const p = at[k];
    const l = nodeLabels[k];
    const fill = m.aboveLine ? c.line : c.share;
    return [
      `<g class="node"><title>${escapeXml(`${m.label}: ${percent(m.share)} influence share`)}</title>`,
      `<circle cx="${num(p.x)}" cy="${num(p.y)}" r="${num(radii[k])}" fill="${fill}" stroke="#ffffff" stroke-width="2"/>`,
      l?.leader
        ? `<line class="leader" x1="${num(l.leader.x1)}" y1="${num(l.leader.y1)}" x2="${num(l.leader.x2)}" y2="${num(l.leader.y2)}" stroke="${c.muted}" stroke-width="1"/>`
        : "",
      ...(l
        ? l.lines.map((line) =>
            text({
              x: line.x,
              y: line.y,
              content: line.content,
              anchor: l.anchor,
              size: MIN_FONT,
              weight: line.bold ? "bold" : "normal",
              fill: c.ink,
            }),
          )
        : []),
      "</g>",
    ].join("");
  });
  const dropped =
    nodeLabels.filter((l) => l === null).length + arrowLabels.filter((l) => l === null).length;
  return svgFrame({
    kind: "attention-map",
    width,
    height,
    title: "Attention map",
    description: `Members on a circle, largest influence share at the top; node area shows the share. An arrow from A to B shows the part of A's counted attention (replies and mentions) that goes to B; arrows under ${percent(MAP_MIN_WEIGHT)} are left out, at most ${MAP_MAX_ARROWS} drawn.${data.notShown > 0 ? ` ${data.notShown} members with smaller shares not shown.` : ""}${dropped > 0 ? " Labels without room are in the table." : ""}`,
    body: heading.markup + key.markup + arrows.join("") + labels.join("") + nodes.join(""),
  });
}
