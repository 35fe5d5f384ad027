/**
 * @module band-line-chart
 * A line chart with its interval drawn as a band: one point per week, the value labelled at every
 * point, the band from each point's low to high end, gaps where a week had no figure. Used for
 * effective voices and for the largest share over the retained history. The y axis starts at 0 so
 * heights compare honestly (common practice for quantities with a natural zero).
 */
import { CHART_COLOURS } from "./palette.js";
import { num, svgFrame, text } from "./svg.js";

export interface BandPoint {
  /** The x label, e.g. "11-29". */
  readonly label: string;
  /** Null = no figure that week (a gap in line and band). */
  readonly value: number | null;
  readonly low: number | null;
  readonly high: number | null;
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
    yTicks?: number;
  },
): BandLineLayout {
  const width = options.width ?? 480;
  const height = options.height ?? 250;
  const plot = { x: 44, y: 28, width: width - 44 - 22, height: height - 28 - 42 };
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
  const yTicks = Array.from({ length: tickCount + 1 }, (_, k) => {
    const value = (options.yMax * k) / tickCount;
    return { y: yOf(value), value };
  });
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

/** The line chart with its band, as a framed SVG. */
export function bandLineChart(args: {
  kind: string;
  title: string;
  description: string;
  points: readonly BandPoint[];
  yMax: number;
  format: (value: number) => string;
  reference?: { readonly value: number; readonly label: string } | null;
  colour?: string;
  /** Number of intervals between y ticks (default 4). */
  yTicks?: number;
}): string {
  const c = CHART_COLOURS;
  const colour = args.colour ?? c.share;
  const layout = bandLineLayout(args.points, {
    yMax: args.yMax,
    reference: args.reference?.value ?? null,
    ...(args.yTicks ? { yTicks: args.yTicks } : {}),
  });
  const { plot } = layout;
  const parts: string[] = [];
  for (const t of layout.yTicks) {
    parts.push(
      `<line x1="${num(plot.x)}" y1="${num(t.y)}" x2="${num(plot.x + plot.width)}" y2="${num(t.y)}" stroke="${c.grid}" stroke-width="1"/>`,
      text({
        x: plot.x - 6,
        y: t.y + 4,
        content: args.format(t.value),
        anchor: "end",
        size: 12,
        fill: c.muted,
      }),
    );
  }
  for (const run of layout.runs) {
    const withBand = run.filter(
      (k) => layout.points[k].lowY !== null && layout.points[k].highY !== null,
    );
    if (withBand.length > 1) {
      const upper = withBand.map(
        (k) => `${num(layout.points[k].x)},${num(layout.points[k].highY ?? 0)}`,
      );
      const lower = withBand
        .reverse()
        .map((k) => `${num(layout.points[k].x)},${num(layout.points[k].lowY ?? 0)}`);
      parts.push(
        `<polygon class="band" points="${[...upper, ...lower].join(" ")}" fill="${c.interval}" fill-opacity="0.35" stroke="none"/>`,
      );
    }
    if (run.length > 1) {
      const path = run
        .map((k) => `${num(layout.points[k].x)},${num(layout.points[k].y ?? 0)}`)
        .join(" ");
      parts.push(
        `<polyline class="trend" points="${path}" fill="none" stroke="${colour}" stroke-width="2.5"/>`,
      );
    }
  }
  if (layout.referenceY !== null && args.reference) {
    parts.push(
      `<line class="threshold" x1="${num(plot.x)}" y1="${num(layout.referenceY)}" x2="${num(plot.x + plot.width)}" y2="${num(layout.referenceY)}" stroke="${c.line}" stroke-width="2" stroke-dasharray="6 4"/>`,
      text({
        x: plot.x + plot.width,
        y: layout.referenceY - 6,
        content: args.reference.label,
        anchor: "end",
        size: 12,
        weight: "bold",
        fill: c.line,
      }),
    );
  }
  const labelEvery = args.points.length > 8 ? 2 : 1;
  args.points.forEach((p, k) => {
    const at = layout.points[k];
    const last = k === args.points.length - 1;
    if (k % labelEvery === 0 || last) {
      parts.push(
        text({
          x: at.x,
          y: plot.y + plot.height + 18,
          content: p.label,
          anchor: "middle",
          size: 11,
          fill: c.muted,
        }),
      );
    }
    if (at.y === null || p.value === null) {
      parts.push(
        text({
          x: at.x,
          y: plot.y + plot.height - 6,
          content: "–",
          anchor: "middle",
          size: 12,
          fill: c.muted,
        }),
      );
      return;
    }
    parts.push(
      `<circle class="point" cx="${num(at.x)}" cy="${num(at.y)}" r="4" fill="${colour}" stroke="#ffffff" stroke-width="1.5"/>`,
      text({
        x: at.x,
        y: (at.highY ?? at.y) - 6,
        content: args.format(p.value),
        anchor: "middle",
        size: 11,
        weight: "bold",
        fill: c.ink,
      }),
    );
  });
  parts.push(
    `<line x1="${num(plot.x)}" y1="${num(plot.y + plot.height)}" x2="${num(plot.x + plot.width)}" y2="${num(plot.y + plot.height)}" stroke="${c.ink}" stroke-width="1"/>`,
    text({ x: plot.x, y: layout.height - 6, content: "week ending", size: 11, fill: c.muted }),
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
