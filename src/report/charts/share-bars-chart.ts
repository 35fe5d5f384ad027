/**
 * @module share-bars-chart
 * Influence shares as horizontal bars (DESIGN.md §5 `influence`): one bar per member, largest
 * first, with its interval as a whisker and the line drawn across every bar, under a visible title
 * and a legend for the three marks. Each bar carries its label and its figures as text above it, so
 * the chart reads without colour and at phone width; a label too long for its row is shortened
 * with "…" and kept whole in the row's `<title>`. Bar length is proportional to the share on a
 * common axis from 0 (Cleveland & McGill 1984, "Graphical perception", JASA 79:531–554: position on
 * a common scale is read most accurately); panels that are compared pass one `axisMax`.
 */
import type { AnalysisReport } from "../../domain/report.js";
import { percent, percentRange } from "../format.js";
import { memberLabeller, type NamingPolicy } from "../naming.js";
import { CHART_COLOURS } from "./palette.js";
import {
  CHART_WIDTH,
  chartTitle,
  escapeXml,
  legend,
  MIN_FONT,
  num,
  svgFrame,
  text,
} from "./svg.js";
import { fitText, textWidth } from "./text-metrics.js";

export interface ShareBarInput {
  readonly label: string;
  readonly share: number;
  readonly low: number;
  readonly high: number;
}

export interface ShareBarGeometry {
  /** The label as drawn (shortened with "…" when it would reach the figures). */
  readonly label: string;
  /** The label in full, for the row's `<title>`. */
  readonly fullLabel: string;
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
  /** Top of the first row (below title and legend). */
  readonly top: number;
  readonly axisY: number;
}

const ROW = 46;
const BAR_HEIGHT = 16;
const LABEL_FONT = 14;
/** Room for the title (y 0–26) and one or two legend rows. */
const HEADER = 30;

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
  options: { line: number | null; width?: number; axisMax?: number; top?: number },
): ShareBarsLayout {
  const width = options.width ?? CHART_WIDTH;
  const plotX = 10;
  const plotWidth = width - 2 * plotX;
  const axisMax = options.axisMax ?? shareAxisMax(rows, options.line);
  const top = options.top ?? HEADER + 24;
  const x = (share: number) =>
    plotX + (Math.max(0, Math.min(share, axisMax)) / axisMax) * plotWidth;
  const bars = rows.map((r, k): ShareBarGeometry => {
    const y = top + k * ROW;
    const figures = `${percent(r.share)} (${percentRange(r.low, r.high)})`;
    const room = plotWidth - textWidth(figures, MIN_FONT) - 12;
    return {
      label: fitText(r.label, LABEL_FONT, room, "bold"),
      fullLabel: r.label,
      figures,
      y,
      barY: y + 20,
      barX: plotX,
      barWidth: x(r.share) - plotX,
      lowX: x(r.low),
      highX: x(r.high),
    };
  });
  const axisY = top + rows.length * ROW + 4;
  const steps = Math.round(axisMax / 0.1);
  const every = steps > 5 ? 2 : 1;
  const ticks = [];
  for (let k = 0; k <= steps; k += every) {
    ticks.push({ x: x(k * 0.1), label: `${k * 10}%` });
  }
  return {
    width,
    height: axisY + 28,
    plotX,
    plotWidth,
    axisMax,
    bars,
    lineX: options.line === null ? null : x(options.line),
    ticks,
    top,
    axisY,
  };
}

/** The legend's swatches: a bar, a whisker, the dashed line. */
function shareLegend(line: number | null, interval: number, x: number, y: number, width: number) {
  const c = CHART_COLOURS;
  const items = [
    {
      swatch: `<rect x="0" y="2" width="22" height="10" fill="${c.share}"/>`,
      label: "influence share",
    },
    {
      swatch: `<line x1="2" y1="7" x2="20" y2="7" stroke="${c.ink}" stroke-width="2"/><line x1="2" y1="2" x2="2" y2="12" stroke="${c.ink}" stroke-width="2"/><line x1="20" y1="2" x2="20" y2="12" stroke="${c.ink}" stroke-width="2"/>`,
      label: `${interval}% interval`,
    },
  ];
  if (line !== null) {
    items.push({
      swatch: `<line x1="11" y1="0" x2="11" y2="14" stroke="${c.line}" stroke-width="2" stroke-dasharray="4 3"/>`,
      label: `line ${percent(line)}`,
    });
  }
  return legend(items, { x, y, maxWidth: width - 2 * x });
}

/** Renders a layout as SVG markup (no frame, no title or legend). */
export function shareBarsBody(layout: ShareBarsLayout, line: number | null): string {
  const c = CHART_COLOURS;
  const parts: string[] = [];
  layout.ticks.forEach((t, k) => {
    const anchor =
      k === 0 ? "start" : t.x >= layout.plotX + layout.plotWidth - 1 ? "end" : "middle";
    parts.push(
      `<line x1="${num(t.x)}" y1="${num(layout.top - 4)}" x2="${num(t.x)}" y2="${num(layout.axisY)}" stroke="${c.grid}" stroke-width="1"/>`,
      text({
        x: t.x,
        y: layout.axisY + 18,
        content: t.label,
        anchor,
        size: MIN_FONT,
        fill: c.muted,
      }),
    );
  });
  // Row texts go last, over the dashed line, each on a white outline.
  const labels: string[] = [];
  for (const b of layout.bars) {
    const mid = b.barY + BAR_HEIGHT / 2;
    parts.push(
      `<g class="bar"><title>${escapeXml(`${b.fullLabel}: ${b.figures}`)}</title>`,
      `<rect class="share" x="${num(b.barX)}" y="${num(b.barY)}" width="${num(b.barWidth)}" height="${BAR_HEIGHT}" fill="${c.share}"/>`,
      `<line class="interval" x1="${num(b.lowX)}" y1="${num(mid)}" x2="${num(b.highX)}" y2="${num(mid)}" stroke="${c.ink}" stroke-width="2"/>`,
      `<line x1="${num(b.lowX)}" y1="${num(mid - 6)}" x2="${num(b.lowX)}" y2="${num(mid + 6)}" stroke="${c.ink}" stroke-width="2"/>`,
      `<line x1="${num(b.highX)}" y1="${num(mid - 6)}" x2="${num(b.highX)}" y2="${num(mid + 6)}" stroke="${c.ink}" stroke-width="2"/>`,
      `</g>`,
    );
    labels.push(
      text({
        x: layout.plotX,
        y: b.y + 14,
        content: b.label,
        size: LABEL_FONT,
        weight: "bold",
        fill: c.ink,
        halo: true,
      }),
      text({
        x: layout.width - layout.plotX,
        y: b.y + 14,
        content: b.figures,
        anchor: "end",
        size: MIN_FONT,
        fill: c.ink,
        halo: true,
      }),
    );
  }
  parts.push(
    `<line x1="${num(layout.plotX)}" y1="${num(layout.axisY)}" x2="${num(layout.plotX + layout.plotWidth)}" y2="${num(layout.axisY)}" stroke="${c.ink}" stroke-width="1"/>`,
  );
  if (layout.lineX !== null && line !== null) {
    parts.push(
      `<line class="threshold" x1="${num(layout.lineX)}" y1="${num(layout.top - 4)}" x2="${num(layout.lineX)}" y2="${num(layout.axisY)}" stroke="${c.line}" stroke-width="2" stroke-dasharray="6 4"><title>line ${percent(line)}</title></line>`,
    );
  }
  return parts.join("") + labels.join("");
}

/** The bars of a report with figures, labelled by the naming rules; null without shares. */
export function shareBarsChart(
  report: AnalysisReport,
  policy: NamingPolicy,
  options: {
    maxBars?: number;
    title?: string;
    kind?: string;
    width?: number;
    /** A common axis end for panels that are compared (default: from this report alone). */
    axisMax?: number;
  } = {},
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
  const width = options.width ?? CHART_WIDTH;
  const interval = Math.round(report.settings.interval * 100);
  const title = options.title ?? "Influence shares";
  const heading = chartTitle(title);
  const key = shareLegend(line, interval, 10, heading.bottom + 6, width);
  const layout = shareBarsLayout(rows, {
    line,
    width,
    top: key.bottom + 10,
    ...(options.axisMax === undefined ? {} : { axisMax: options.axisMax }),
  });
  const more = report.influence.length - shown.length;
  const moreNote =
    more > 0
      ? text({
          x: layout.plotX,
          y: layout.height + 8,
          content: `${more} more member${more === 1 ? "" : "s"} with smaller shares not shown`,
          size: MIN_FONT,
          fill: CHART_COLOURS.muted,
        })
      : "";
  return svgFrame({
    kind: options.kind ?? "shares",
    width: layout.width,
    height: layout.height + (more > 0 ? 18 : 0),
    title,
    description: `Influence share of each member, largest first, with the ${interval}% interval as a whisker${line === null ? "" : ` and the line at ${percent(line)} as a dashed line`}${more > 0 ? `; ${more} more members not shown` : ""}.`,
    body: heading.markup + key.markup + shareBarsBody(layout, line) + moreNote,
  });
}
