/**
 * @module compare-chart
 * Two periods side by side (`compare`, DESIGN.md §6): for effective voices and for the largest
 * share, period A and period B as a point with its interval on one common axis per panel, each
 * labelled with its period and figures, under a visible title and a legend (A a circle, B a
 * square, so the periods differ by shape as well as colour). The effective-voices axis ends at the
 * larger period's active members, the most possible, and says so; the share axis ends on the 10%
 * step above both periods' interval ends.
 */

import type { CompareReport } from "../../analysis/compare-periods.js";
import type { AnalysisReport } from "../../domain/report.js";
import { decimal1, percent, percentRange } from "../format.js";
import { ticksUpTo } from "./band-line-chart.js";
import { placeLabels } from "./label-placer.js";
import { CHART_COLOURS } from "./palette.js";
import { CHART_WIDTH, chartTitle, legend, MIN_FONT, num, svgFrame, text } from "./svg.js";
import { textBox } from "./text-metrics.js";

export interface IntervalMark {
  readonly value: number;
  readonly low: number;
  readonly high: number;
}

/** x of a value on an axis from 0 to `axisMax` spanning [plotX, plotX + plotWidth]. */
export function axisX(
  value: number,
  axis: { axisMax: number; plotX: number; plotWidth: number },
): number {
  const clamped = Math.max(0, Math.min(value, axis.axisMax));
  return axis.plotX + (clamped / axis.axisMax) * axis.plotWidth;
}

function voices(report: AnalysisReport): IntervalMark | null {
  return report.effectiveVoices;
}

function topShare(report: AnalysisReport): IntervalMark | null {
  return report.top
    ? { value: report.top.share, low: report.top.low, high: report.top.high }
    : null;
}

/** A marker centred at (x, y): a circle for A, a square for B. */
function marker(shape: "circle" | "square", x: number, y: number, fill: string, r = 7): string {
  const edge = `stroke="${CHART_COLOURS.ink}" stroke-width="1.5"`;
  return shape === "circle"
    ? `<circle cx="${num(x)}" cy="${num(y)}" r="${num(r)}" fill="${fill}" ${edge}/>`
    : `<rect x="${num(x - r + 0.5)}" y="${num(y - r + 0.5)}" width="${num(2 * r - 1)}" height="${num(2 * r - 1)}" fill="${fill}" ${edge}/>`;
}

/** The compare chart; every period without figures is drawn as a labelled "no figures" row. */
export function compareChart(result: CompareReport): string {
  const c = CHART_COLOURS;
  const width = CHART_WIDTH;
  const axis = { plotX: 14, plotWidth: width - 28, axisMax: 1 };
  const periods = [
    { name: "A", range: result.a.range, report: result.a.report, colour: c.share },
    { name: "B", range: result.b.range, report: result.b.report, colour: c.periodB },
  ] as const;
  const shapes = { A: "circle", B: "square" } as const;
  const maxMembers = Math.max(2, result.a.report.members, result.b.report.members);
  const highs = periods.map((p) => topShare(p.report)?.high ?? 0);
  const shareMax = Math.min(1, Math.ceil((Math.max(0.1, ...highs) * 1.05) / 0.1) * 0.1);
  const panels = [
    {
      title: `Effective voices, out of ${maxMembers} active members`,
      pick: voices,
      axisMax: maxMembers,
      ticks: ticksUpTo(maxMembers, maxMembers <= 10 ? 2 : maxMembers <= 30 ? 5 : 10),
      tick: (v: number) => (v === maxMembers ? `${v} members` : String(v)),
      format: (v: number) => decimal1(v),
      range: (m: IntervalMark) => `${decimal1(m.low)}–${decimal1(m.high)}`,
    },
    {
      title: "Largest share",
      pick: topShare,
      axisMax: shareMax,
      ticks: ticksUpTo(shareMax, shareMax > 0.5 ? 0.2 : 0.1),
      tick: percent,
      format: percent,
      range: (m: IntervalMark) => percentRange(m.low, m.high),
    },
  ];
  const heading = chartTitle("Period A against period B");
  const key = legend(
    [
      { swatch: marker("circle", 11, 7, c.share, 6), label: "period A" },
      { swatch: marker("square", 11, 7, c.periodB, 6), label: "period B" },
      {
        swatch: `<line x1="0" y1="7" x2="22" y2="7" stroke="${c.ink}" stroke-width="5" stroke-opacity="0.6" stroke-linecap="round"/>`,
        label: "interval",
      },
    ],
    { x: axis.plotX, y: heading.bottom + 6, maxWidth: width - 2 * axis.plotX },
  );
  const parts: string[] = [heading.markup, key.markup];
  let y = key.bottom + 10;
  for (const panel of panels) {
    parts.push(
      text({
        x: axis.plotX,
        y: y + 14,
        content: panel.title,
        weight: "bold",
        size: 14,
        fill: c.ink,
      }),
    );
    y += 24;
    const a = { ...axis, axisMax: panel.axisMax };
    for (const period of periods) {
      const mark = panel.pick(period.report);
      const caption = mark
        ? `${period.name} ${period.range}: ${panel.format(mark.value)} (${panel.range(mark)})`
        : `${period.name} ${period.range}: no figures`;
      parts.push(text({ x: axis.plotX, y: y + 13, content: caption, size: MIN_FONT, fill: c.ink }));
      const mid = y + 30;
      if (mark) {
        parts.push(
          `<g class="period-mark"><line class="interval" x1="${num(axisX(mark.low, a))}" y1="${num(mid)}" x2="${num(axisX(mark.high, a))}" y2="${num(mid)}" stroke="${c.ink}" stroke-width="5" stroke-linecap="round" stroke-opacity="0.6"/>`,
          marker(shapes[period.name], axisX(mark.value, a), mid, period.colour),
          "</g>",
        );
      }
      y += 44;
    }
    const ticks = panel.ticks.map((v, k) => {
      const x = axisX(v, a);
      const anchor = k === 0 ? "start" : k === panel.ticks.length - 1 ? "end" : "middle";
      const label = { x, y: y + 18, content: panel.tick(v), size: MIN_FONT, anchor } as const;
      return { x, label };
    });
    const placed = placeLabels({
      labels: [ticks[0], ticks[ticks.length - 1], ...ticks.slice(1, -1)].map((t) => [
        { boxes: [textBox(t.label)], value: t },
      ]),
      bounds: { x: 0, y, width, height: 30 },
      gap: 6,
    });
    parts.push(
      `<line x1="${num(a.plotX)}" y1="${num(y)}" x2="${num(a.plotX + a.plotWidth)}" y2="${num(y)}" stroke="${c.ink}" stroke-width="1"/>`,
    );
    for (const t of placed) {
      if (!t) continue;
      parts.push(
        `<line x1="${num(t.x)}" y1="${num(y)}" x2="${num(t.x)}" y2="${num(y + 5)}" stroke="${c.ink}" stroke-width="1"/>`,
        text({ ...t.label, fill: c.muted }),
      );
    }
    y += 36;
  }
  return svgFrame({
    kind: "compare",
    width,
    height: y,
    title: `Period A ${result.a.range} against period B ${result.b.range}`,
    description:
      "Effective voices and the largest share of each period, each as a point with its interval on a common axis.",
    body: parts.join(""),
  });
}
