/**
 * @module share-bars-chart
 * Influence shares as horizontal bars (DESIGN.md §5 `influence`): one bar per member, largest
 * first, with its interval as a whisker and the line drawn across every bar. Each bar carries its
 * label and its figures as text above it, so the chart reads without colour and at phone width.
 * Bar length is proportional to the share on a common axis from 0 (Cleveland & McGill 1984,
 * "Graphical perception", JASA 79:531–554: position on a common scale is read most accurately).
 */
import type { AnalysisReport } from "../../domain/report.js";
import { percent, percentRange } from "../format.js";
import { memberLabeller, type NamingPolicy } from "../naming.js";
import { CHART_COLOURS } from "./palette.js";
import { num, svgFrame, text } from "./svg.js";

export interface ShareBarInput {
  readonly label: string;
  readonly share: number;
  readonly low: number;
  readonly high: number;
}

export interface ShareBarGeometry {
  readonly label: string;
  readonly figures: string;
  /** Top of the row's label line. */
  readonly y: number;
  readonly barY: number;
  readonly barX: number;
  readonly barWidth: number;
  readonly lowX: number;
  readonly highX: number;
}

export interface ShareBarsLayout {
  readonly width: number;
  readonly height: number;
  readonly plotX: number;
  readonly plotWidth: number;
  /** Share at the right end of the axis. */
  readonly axisMax: number;
  readonly bars: readonly ShareBarGeometry[];
  readonly lineX: number | null;
  readonly ticks: readonly { readonly x: number; readonly label: string }[];
  readonly axisY: number;
}

const ROW = 46;
const BAR_HEIGHT = 16;
const TOP = 30;

/** The axis end: the largest interval end or line plus a margin, in steps of 10%, at most 100%. */
export function shareAxisMax(rows: readonly ShareBarInput[], line: number | null): number {
  const largest = Math.max(
    0.05,
    line ?? 0,
    ...rows.map((r) => r.high),
    ...rows.map((r) => r.share),
  );
  return Math.min(1, Math.ceil((largest * 1.08) / 0.1) * 0.1);
}

/** Where every mark goes: x = plotX + share / axisMax · plotWidth for bars, whiskers and the line. */
export function shareBarsLayout(
  rows: readonly ShareBarInput[],
  options: { line: number | null; width?: number },
): ShareBarsLayout {
  const width = options.width ?? 480;
  const plotX = 10;
  const plotWidth = width - 2 * plotX;
  const axisMax = shareAxisMax(rows, options.line);
  const x = (share: number) =>
    plotX + (Math.max(0, Math.min(share, axisMax)) / axisMax) * plotWidth;
  const bars = rows.map((r, k): ShareBarGeometry => {
    const y = TOP + k * ROW;
    return {
      label: r.label,
      figures: `${percent(r.share)} (${percentRange(r.low, r.high)})`,
      y,
      barY: y + 20,
      barX: plotX,
      barWidth: x(r.share) - plotX,
      lowX: x(r.low),
      highX: x(r.high),
    };
  });
  const axisY = TOP + rows.length * ROW + 4;
  const steps = Math.round(axisMax / 0.1);
  const every = steps > 5 ? 2 : 1;
  const ticks = [];
  for (let k = 0; k <= steps; k += every) {
    ticks.push({ x: x(k * 0.1), label: `${k * 10}%` });
  }
  return {
    width,
    height: axisY + 30,
    plotX,
    plotWidth,
    axisMax,
    bars,
    lineX: options.line === null ? null : x(options.line),
    ticks,
    axisY,
  };
}

/** Renders a layout as SVG markup (no frame). */
export function shareBarsBody(layout: ShareBarsLayout, line: number | null): string {
  const c = CHART_COLOURS;
  const parts: string[] = [];
  layout.ticks.forEach((t, k) => {
    const anchor =
      k === 0 ? "start" : t.x >= layout.plotX + layout.plotWidth - 1 ? "end" : "middle";
    parts.push(
      `<line x1="${num(t.x)}" y1="${num(TOP - 4)}" x2="${num(t.x)}" y2="${num(layout.axisY)}" stroke="${c.grid}" stroke-width="1"/>`,
      text({ x: t.x, y: layout.axisY + 18, content: t.label, anchor, size: 12, fill: c.muted }),
    );
  });
  for (const b of layout.bars) {
    const mid = b.barY + BAR_HEIGHT / 2;
    parts.push(
      `<g class="bar">`,
      text({ x: layout.plotX, y: b.y + 14, content: b.label, weight: "bold", fill: c.ink }),
      text({
        x: layout.width - layout.plotX,
        y: b.y + 14,
        content: b.figures,
        anchor: "end",
        fill: c.ink,
      }),
      `<rect class="share" x="${num(b.barX)}" y="${num(b.barY)}" width="${num(b.barWidth)}" height="${BAR_HEIGHT}" fill="${c.share}"/>`,
      `<line class="interval" x1="${num(b.lowX)}" y1="${num(mid)}" x2="${num(b.highX)}" y2="${num(mid)}" stroke="${c.ink}" stroke-width="2"/>`,
      `<line x1="${num(b.lowX)}" y1="${num(mid - 6)}" x2="${num(b.lowX)}" y2="${num(mid + 6)}" stroke="${c.ink}" stroke-width="2"/>`,
      `<line x1="${num(b.highX)}" y1="${num(mid - 6)}" x2="${num(b.highX)}" y2="${num(mid + 6)}" stroke="${c.ink}" stroke-width="2"/>`,
      `</g>`,
    );
  }
  parts.push(
    `<line x1="${num(layout.plotX)}" y1="${num(layout.axisY)}" x2="${num(layout.plotX + layout.plotWidth)}" y2="${num(layout.axisY)}" stroke="${c.ink}" stroke-width="1"/>`,
  );
  if (layout.lineX !== null && line !== null) {
    const anchor = layout.lineX > layout.width * 0.75 ? "end" : "start";
    parts.push(
      `<line class="threshold" x1="${num(layout.lineX)}" y1="${num(TOP - 8)}" x2="${num(layout.lineX)}" y2="${num(layout.axisY)}" stroke="${c.line}" stroke-width="2" stroke-dasharray="6 4"/>`,
      text({
        x: layout.lineX + (anchor === "end" ? -4 : 4),
        y: TOP - 12,
        content: `line ${percent(line)}`,
        anchor,
        size: 12,
        weight: "bold",
        fill: c.line,
      }),
    );
  }
  return parts.join("");
}

/** The bars of a report with figures, labelled by the naming rules; null without shares. */
export function shareBarsChart(
  report: AnalysisReport,
  policy: NamingPolicy,
  options: { maxBars?: number; title?: string; kind?: string; width?: number } = {},
): string | null {
  if (!report.influence || report.influence.length === 0) return null;
  const label = memberLabeller(report.influence, policy);
  const shown = report.influence.slice(0, options.maxBars ?? 20);
  const rows = shown.map((e) => ({
    label: label(e.member),
    share: e.share,
    low: e.low,
    high: e.high,
  }));
  const line = report.line?.threshold ?? null;
  const layout = shareBarsLayout(rows, {
    line,
    ...(options.width ? { width: options.width } : {}),
  });
  const more = report.influence.length - shown.length;
  const interval = Math.round(report.settings.interval * 100);
  return svgFrame({
    kind: options.kind ?? "shares",
    width: layout.width,
    height: layout.height,
    title: options.title ?? "Influence shares",
    description: `Influence share of each member, largest first, with the ${interval}% interval as a whisker${line === null ? "" : ` and the line at ${percent(line)} as a dashed line`}${more > 0 ? `; ${more} more members not shown` : ""}.`,
    body: shareBarsBody(layout, line),
  });
}
