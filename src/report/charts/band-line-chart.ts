/**
 * @module band-line-chart
 * A line chart with its interval drawn as a band: one point per week, the band from each point's
 * low to high end (edged so it stays visible against white), gaps where a week had no figure, a
 * visible title and a legend for every line style. Value labels go through the greedy label placer:
 * above the band, below it, or beside the point, never over a tick label or another label; a label
 * with no free place is left out and kept in the point's `<title>` and the table beside the chart.
 * An optional ceiling series (for effective voices: the active members, the most possible) is drawn
 * dotted and sets the axis top. The y axis starts at 0 so heights compare honestly (common practice
 * for quantities with a natural zero). Optional period bands (meeting formats) shade the plot
 * behind the marks, each format with its own hatching, edged with dashed lines and named in a
 * strip of their own above the plot and in the legend, so they read without colour and never sit
 * on a value label.
 */
import { type LabelCandidate, placeLabels } from "./label-placer.js";
import { CHART_COLOURS } from "./palette.js";
import {
  CHART_WIDTH,
  chartTitle,
  escapeXml,
  type LegendItem,
  legend,
  MIN_FONT,
  num,
  svgFrame,
  text,
} from "./svg.js";
import { type Box, textBox } from "./text-metrics.js";

export interface BandPoint {
  /** The x label, e.g. "11-29". */
  readonly label: string;
  /** Null = no figure that week (a gap in line and band). */
  readonly value: number | null;
  readonly low: number | null;
  readonly high: number | null;
}

/** A shaded stretch of the x axis, e.g. a format period. */
export interface PeriodBand {
  /** Fractional point positions: 0 = the first point, n − 1 = the last (clipped to them). */
  readonly from: number;
  readonly to: number;
  readonly label: string;
  /** The hatching (same format, same hatching), cycling through FORMAT_HATCHES. */
  readonly style: number;
}

/** Hatchings of the period bands, drawn in the grid grey: diagonal, dots, horizontal, crossed. */
const FORMAT_HATCHES: readonly string[] = [
  `<line x1="0" y1="0" x2="0" y2="8" stroke="#c8c8c8" stroke-width="3"/>`,
  `<circle cx="4" cy="4" r="1.7" fill="#c8c8c8"/>`,
  `<line x1="0" y1="4" x2="8" y2="4" stroke="#c8c8c8" stroke-width="2"/>`,
  `<line x1="0" y1="0" x2="0" y2="8" stroke="#c8c8c8" stroke-width="1.5"/><line x1="0" y1="4" x2="8" y2="4" stroke="#c8c8c8" stroke-width="1.5"/>`,
];

function hatchId(kind: string, style: number): string {
  return `${kind}-period-${style % FORMAT_HATCHES.length}`;
}

function hatchDefs(kind: string, styles: readonly number[]): string {
  const unique = [...new Set(styles.map((s) => s % FORMAT_HATCHES.length))];
  return `<defs>${unique
    .map(
      (s) =>
        `<pattern id="${hatchId(kind, s)}" patternUnits="userSpaceOnUse" width="8" height="8"${s === 0 ? ' patternTransform="rotate(45)"' : ""}>${FORMAT_HATCHES[s]}</pattern>`,
    )
    .join("")}</defs>`;
}

export interface BandLineLayout {
  readonly width: number;
  readonly height: number;
  readonly plot: {
    readonly x: number;
    readonly y: number;
    readonly width: number;
    readonly height: number;
  };
  readonly points: readonly {
    readonly x: number;
    readonly y: number | null;
    readonly lowY: number | null;
    readonly highY: number | null;
  }[];
  /** Indices of runs of consecutive points with a figure. */
  readonly runs: readonly (readonly number[])[];
  readonly yTicks: readonly { readonly y: number; readonly value: number }[];
  readonly referenceY: number | null;
}

/** Places points evenly across the plot; y = plot bottom − value / yMax · plot height. */
export function bandLineLayout(
  points: readonly BandPoint[],
  options: {
    yMax: number;
    reference?: number | null;
    width?: number;
    height?: number;
    /** Number of even intervals between y ticks (default 4); ignored when `yTickValues` is set. */
    yTicks?: number;
    yTickValues?: readonly number[];
    /** Top of the plot (room for title and legend above). */
    top?: number;
  },
): BandLineLayout {
  const width = options.width ?? CHART_WIDTH;
  const height = options.height ?? 250;
  const top = options.top ?? 28;
  const plot = { x: 48, y: top, width: width - 48 - 24, height: height - top - 44 };
  const yOf = (v: number) =>
    plot.y + plot.height - (Math.max(0, Math.min(v, options.yMax)) / options.yMax) * plot.height;
  const step = points.length > 1 ? plot.width / (points.length - 1) : 0;
  const placed = points.map((p, k) => ({
    x: points.length > 1 ? plot.x + k * step : plot.x + plot.width / 2,
    y: p.value === null ? null : yOf(p.value),
    lowY: p.low === null ? null : yOf(p.low),
    highY: p.high === null ? null : yOf(p.high),
  }));
  const runs: number[][] = [];
  let current: number[] = [];
  placed.forEach((p, k) => {
    if (p.y === null) {
      if (current.length > 0) runs.push(current);
      current = [];
    } else current.push(k);
  });
  if (current.length > 0) runs.push(current);
  const tickCount = options.yTicks ?? 4;
  const values =
    options.yTickValues ??
    Array.from({ length: tickCount + 1 }, (_, k) => (options.yMax * k) / tickCount);
  const yTicks = values.map((value) => ({ y: yOf(value), value }));
  const reference = options.reference ?? null;
  return {
    width,
    height,
    plot,
    points: placed,
    runs,
    yTicks,
    referenceY: reference === null ? null : yOf(reference),
  };
}

/**
 * Tick values for an axis from 0 to `top`: multiples of a round step, and `top` itself as the last
 * tick (a multiple closer than half a step to `top` is left out so the two labels keep apart).
 */
export function ticksUpTo(top: number, step: number): number[] {
  const ticks: number[] = [];
  for (let v = 0; v < top - step / 2 + 1e-9; v += step) ticks.push(Math.round(v * 1e9) / 1e9);
  ticks.push(top);
  return ticks;
}

function polyline(
  points: readonly { x: number; y: number }[],
  attrs: string,
  className: string,
): string {
  return `<polyline class="${className}" points="${points.map((p) => `${num(p.x)},${num(p.y)}`).join(" ")}" fill="none" ${attrs}/>`;
}

interface PointLabel {
  readonly x: number;
  readonly y: number;
  readonly anchor: "start" | "middle" | "end";
  readonly content: string;
}

/** The line chart with its band, as a framed SVG. */
export function bandLineChart(args: {
  kind: string;
  title: string;
  description: string;
  points: readonly BandPoint[];
  yMax: number;
  format: (value: number) => string;
  /** Format of the y tick labels (default `format`). */
  tickFormat?: (value: number) => string;
  /** Dashed horizontal reference (the line); named in the legend. */
  reference?: { readonly value: number; readonly label: string } | null;
  /** Dotted series drawn over the weeks, e.g. the active members; named in the legend. */
  ceiling?: { readonly values: readonly (number | null)[]; readonly label: string } | null;
  colour?: string;
  /** Number of even intervals between y ticks (default 4). */
  yTicks?: number;
  /** Explicit tick values (overrides `yTicks`). */
  yTickValues?: readonly number[];
  /** Legend words for the line and the band (defaults "value", "interval"). */
  seriesLabel?: string;
  intervalLabel?: string;
  width?: number;
  /** Shaded periods behind the marks (format periods), named above the plot and in the legend. */
  bands?: readonly PeriodBand[];
}): string {
  const c = CHART_COLOURS;
  const colour = args.colour ?? c.share;
  const width = args.width ?? CHART_WIDTH;
  const heading = chartTitle(args.title);
  const items: LegendItem[] = [
    {
      swatch: `<line x1="0" y1="7" x2="22" y2="7" stroke="${colour}" stroke-width="2.5"/><circle cx="11" cy="7" r="3.5" fill="${colour}"/>`,
      label: args.seriesLabel ?? "value",
    },
    {
      swatch: `<rect x="0" y="2" width="22" height="10" fill="${c.interval}" fill-opacity="0.35" stroke="${colour}" stroke-width="1"/>`,
      label: args.intervalLabel ?? "interval",
    },
  ];
  if (args.ceiling) {
    items.push({
      swatch: `<line x1="0" y1="7" x2="22" y2="7" stroke="${c.ink}" stroke-width="2" stroke-dasharray="1 3" stroke-linecap="round"/>`,
      label: args.ceiling.label,
    });
  }
  if (args.reference) {
    items.push({
      swatch: `<line x1="0" y1="7" x2="22" y2="7" stroke="${c.line}" stroke-width="2" stroke-dasharray="6 4"/>`,
      label: args.reference.label,
    });
  }
  const bands = args.bands ?? [];
  const bandStyles = new Map<string, number>();
  for (const band of bands) if (!bandStyles.has(band.label)) bandStyles.set(band.label, band.style);
  for (const [label, style] of bandStyles) {
    items.push({
      swatch: `<rect x="0.5" y="1.5" width="21" height="11" fill="url(#${hatchId(args.kind, style)})" stroke="${c.muted}" stroke-width="1" stroke-dasharray="3 2"/>`,
      label: `format ${label}`,
    });
  }
  const key = legend(items, { x: 10, y: heading.bottom + 6, maxWidth: width - 20 });
  // A strip above the plot for the band names, so they never meet a value label.
  const strip = bands.length > 0 ? MIN_FONT + 8 : 0;
  const top = key.bottom + 14 + strip;
  const layout = bandLineLayout(args.points, {
    yMax: args.yMax,
    reference: args.reference?.value ?? null,
    width,
    height: top + 190,
    top,
    ...(args.yTicks ? { yTicks: args.yTicks } : {}),
    ...(args.yTickValues ? { yTickValues: args.yTickValues } : {}),
  });
  const { plot } = layout;
  const bottom = plot.y + plot.height;
  const parts: string[] = [heading.markup, key.markup];
  const obstacles: Box[] = [];
  if (bands.length > 0) {
    parts.push(hatchDefs(args.kind, [...bandStyles.values()]));
    parts.push(...periodBands({ bands, layout, kind: args.kind, strip, obstacles }));
  }
  for (const t of layout.yTicks) {
    const label = {
      x: plot.x - 6,
      y: t.y + 4.5,
      content: (args.tickFormat ?? args.format)(t.value),
      size: MIN_FONT,
    };
    obstacles.push(textBox({ ...label, anchor: "end" }));
    parts.push(
      `<line x1="${num(plot.x)}" y1="${num(t.y)}" x2="${num(plot.x + plot.width)}" y2="${num(t.y)}" stroke="${c.grid}" stroke-width="1"/>`,
      text({ ...label, anchor: "end", fill: c.muted }),
    );
  }
  for (const run of layout.runs) {
    const withBand = run.filter(
      (k) => layout.points[k].lowY !== null && layout.points[k].highY !== null,
    );
    if (withBand.length > 1) {
      const upper = withBand.map((k) => ({
        x: layout.points[k].x,
        y: layout.points[k].highY ?? 0,
      }));
      const lower = withBand.map((k) => ({ x: layout.points[k].x, y: layout.points[k].lowY ?? 0 }));
      parts.push(
        `<polygon class="band" points="${[...upper, ...[...lower].reverse()].map((p) => `${num(p.x)},${num(p.y)}`).join(" ")}" fill="${c.interval}" fill-opacity="0.35" stroke="none"/>`,
        polyline(upper, `stroke="${colour}" stroke-width="1"`, "band-edge"),
        polyline(lower, `stroke="${colour}" stroke-width="1"`, "band-edge"),
      );
    }
    if (run.length > 1) {
      parts.push(
        polyline(
          run.map((k) => ({ x: layout.points[k].x, y: layout.points[k].y ?? 0 })),
          `stroke="${colour}" stroke-width="2.5"`,
          "trend",
        ),
      );
    }
  }
  if (args.ceiling) {
    const yOf = (v: number) => bottom - (Math.min(v, args.yMax) / args.yMax) * plot.height;
    const marks = args.ceiling.values.flatMap((v, k) =>
      v === null ? [] : [{ x: layout.points[k].x, y: yOf(v) }],
    );
    if (marks.length > 1) {
      parts.push(
        polyline(
          marks,
          `stroke="${c.ink}" stroke-width="2" stroke-dasharray="1 3" stroke-linecap="round"`,
          "ceiling",
        ),
      );
    }
  }
  if (layout.referenceY !== null && args.reference) {
    parts.push(
      `<line class="threshold" x1="${num(plot.x)}" y1="${num(layout.referenceY)}" x2="${num(plot.x + plot.width)}" y2="${num(layout.referenceY)}" stroke="${c.line}" stroke-width="2" stroke-dasharray="6 4"/>`,
    );
  }
  // Week labels under the axis: the last always, then every k-th from the first that fits.
  const weekRequests = args.points.map((p, k) => {
    const label = {
      x: layout.points[k].x,
      y: bottom + 19,
      content: p.label,
      size: MIN_FONT,
      anchor: "middle" as const,
    };
    return [{ boxes: [textBox(label)], value: label }];
  });
  const order = [args.points.length - 1, ...args.points.keys()].filter(
    (k, i, all) => all.indexOf(k) === i,
  );
  const xBounds = { x: 0, y: bottom, width, height: layout.height - bottom };
  const placedWeeks = placeLabels({
    labels: order.map((k) => weekRequests[k]),
    bounds: xBounds,
    gap: 8,
  });
  for (const label of placedWeeks) {
    if (label) {
      parts.push(text({ ...label, fill: c.muted }));
      obstacles.push(textBox(label));
    }
  }
  const xCaption = { x: 10, y: layout.height - 6, content: "week ending", size: MIN_FONT };
  parts.push(text({ ...xCaption, fill: c.muted }));
  // Points, their gap marks, and their value labels through the placer.
  const requests: { k: number; candidates: LabelCandidate<PointLabel>[] }[] = [];
  args.points.forEach((p, k) => {
    const at = layout.points[k];
    if (at.y === null || p.value === null) {
      const dash = {
        x: at.x,
        y: bottom - 6,
        content: "–",
        size: MIN_FONT,
        anchor: "middle" as const,
      };
      parts.push(
        `<g class="gap"><title>${escapeXml(`${p.label}: no figure`)}</title>${text({ ...dash, fill: c.muted })}</g>`,
      );
      obstacles.push(textBox(dash));
      return;
    }
    obstacles.push({ x: at.x - 5, y: at.y - 5, width: 10, height: 10 });
    const content = args.format(p.value);
    const above = (at.highY ?? at.y) - 6;
    const below = (at.lowY ?? at.y) + 6 + 0.93 * MIN_FONT;
    const spots: PointLabel[] = [
      { x: at.x, y: above, anchor: "middle", content },
      { x: at.x, y: below, anchor: "middle", content },
      { x: at.x, y: at.y - 8, anchor: "middle", content },
      { x: at.x, y: at.y + 8 + 0.93 * MIN_FONT, anchor: "middle", content },
      { x: at.x + 7, y: at.y - 7, anchor: "start", content },
      { x: at.x - 7, y: at.y - 7, anchor: "end", content },
    ];
    requests.push({
      k,
      candidates: spots.map((s) => ({
        boxes: [textBox({ ...s, size: MIN_FONT, weight: "bold" })],
        value: s,
      })),
    });
  });
  // Priority: the latest week, then the highest and lowest, then the rest from the latest back.
  const figureAt = (k: number) => args.points[k].value ?? 0;
  const byValue = [...requests].sort((a, b) => figureAt(b.k) - figureAt(a.k));
  const priority = [
    requests[requests.length - 1],
    byValue[0],
    byValue[byValue.length - 1],
    ...[...requests].reverse(),
  ].filter((r, i, all) => r !== undefined && all.indexOf(r) === i);
  const plotBounds = {
    x: plot.x,
    y: plot.y - 12,
    width: plot.width + 20,
    height: plot.height + 12,
  };
  const placed = placeLabels({
    labels: priority.map((r) => r.candidates),
    obstacles,
    bounds: plotBounds,
    gap: 2,
  });
  const labelOf = new Map(priority.map((r, i) => [r.k, placed[i]]));
  args.points.forEach((p, k) => {
    const at = layout.points[k];
    if (at.y === null || p.value === null) return;
    const range =
      p.low !== null && p.high !== null ? ` (${args.format(p.low)}–${args.format(p.high)})` : "";
    const label = labelOf.get(k);
    parts.push(
      `<g class="point"><title>${escapeXml(`${p.label}: ${args.format(p.value)}${range}`)}</title>`,
      `<circle class="point" cx="${num(at.x)}" cy="${num(at.y)}" r="4" fill="${colour}" stroke="#ffffff" stroke-width="1.5"/>`,
      label
        ? text({
            ...label,
            size: MIN_FONT,
            weight: "bold",
            fill: c.ink,
            className: "value",
            halo: true,
          })
        : "",
      "</g>",
    );
  });
  parts.push(
    `<line x1="${num(plot.x)}" y1="${num(bottom)}" x2="${num(plot.x + plot.width)}" y2="${num(bottom)}" stroke="${c.ink}" stroke-width="1"/>`,
  );
  return svgFrame({
    kind: args.kind,
    width: layout.width,
    height: layout.height,
    title: args.title,
    description: args.description,
    body: parts.join(""),
  });
}

/**
 * The period bands: a hatched rectangle over the plot's height for each, dashed edges at its
 * ends, and its name in the strip above the plot where it fits inside the band's width (else in
 * the band's hover title only; the legend and the chart's table name every format).
 */
function periodBands(args: {
  bands: readonly PeriodBand[];
  layout: BandLineLayout;
  kind: string;
  strip: number;
  obstacles: Box[];
}): string[] {
  const { layout, strip } = args;
  const { plot } = layout;
  const last = layout.points.length - 1;
  const step = last > 0 ? plot.width / last : 0;
  const xOf = (position: number) => plot.x + Math.max(0, Math.min(last, position)) * step;
  const bottom = plot.y + plot.height;
  const parts: string[] = [];
  const edges = new Set<number>();
  const requests: { x0: number; x1: number; label: string }[] = [];
  for (const band of args.bands) {
    const x0 = xOf(band.from);
    const x1 = xOf(band.to);
    if (!(x1 - x0 >= 1)) continue;
    parts.push(
      `<g class="format-band"><title>${escapeXml(`format ${band.label}`)}</title><rect x="${num(x0)}" y="${num(plot.y)}" width="${num(x1 - x0)}" height="${num(plot.height)}" fill="url(#${hatchId(args.kind, band.style)})" fill-opacity="0.8"/></g>`,
    );
    // Edges where a period starts or ends inside the plot (not where the plot clips it).
    for (const x of [x0, x1]) {
      const key = Math.round(x * 10);
      if (edges.has(key) || x <= plot.x + 0.5 || x >= plot.x + plot.width - 0.5) continue;
      edges.add(key);
      parts.push(
        `<line class="format-edge" x1="${num(x)}" y1="${num(plot.y - strip + 2)}" x2="${num(x)}" y2="${num(bottom)}" stroke="${CHART_COLOURS.muted}" stroke-width="1" stroke-dasharray="3 3"/>`,
      );
    }
    requests.push({ x0, x1, label: band.label });
  }
  const y = plot.y - 6;
  const labels = requests.map((r) => {
    const spots: { x: number; anchor: "start" | "middle" | "end" }[] = [
      { x: (r.x0 + r.x1) / 2, anchor: "middle" },
      { x: r.x0 + 4, anchor: "start" },
      { x: r.x1 - 4, anchor: "end" },
    ];
    return spots
      .map((spot) => ({ ...spot, y, content: r.label }))
      .filter((spot) => {
        const box = textBox({ ...spot, size: MIN_FONT });
        return box.x >= r.x0 + 2 && box.x + box.width <= r.x1 - 2;
      })
      .map((spot) => ({ boxes: [textBox({ ...spot, size: MIN_FONT })], value: spot }));
  });
  const placed = placeLabels({
    labels,
    bounds: { x: plot.x, y: plot.y - strip, width: plot.width, height: strip },
    gap: 4,
  });
  for (const label of placed) {
    if (label === null) continue;
    args.obstacles.push(textBox({ ...label, size: MIN_FONT }));
    parts.push(
      text({ ...label, size: MIN_FONT, fill: CHART_COLOURS.ink, className: "band-label" }),
    );
  }
  return parts;
}
