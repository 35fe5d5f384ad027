/**
 * @module compare-chart
 * Two periods side by side (`compare`, DESIGN.md §6): for effective voices and for the largest
 * share, period A and period B as a point with its interval on one common axis, each labelled with
 * its period and figures, so the change and its uncertainty read at a glance.
 */

import type { CompareReport } from "../../analysis/compare-periods.js";
import type { AnalysisReport } from "../../domain/report.js";
import { decimal1, percent, percentRange } from "../format.js";
import { CHART_COLOURS } from "./palette.js";
import { num, svgFrame, text } from "./svg.js";

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

/** The compare chart; every period without figures is drawn as a labelled "no figures" row. */
export function compareChart(result: CompareReport): string {
  const c = CHART_COLOURS;
  const width = 480;
  const axis = { plotX: 12, plotWidth: width - 24, axisMax: 1 };
  const periods = [
    { name: "A", range: result.a.range, report: result.a.report, colour: c.share },
    { name: "B", range: result.b.range, report: result.b.report, colour: c.periodB },
  ];
  const maxMembers = Math.max(2, result.a.report.members, result.b.report.members);
  const panels = [
    {
      title: "Effective voices",
      pick: voices,
      axisMax: maxMembers,
      format: (v: number) => decimal1(v),
      range: (m: IntervalMark) => `${decimal1(m.low)}–${decimal1(m.high)}`,
    },
    {
      title: "Largest share",
      pick: topShare,
      axisMax: 1,
      format: percent,
      range: (m: IntervalMark) => percentRange(m.low, m.high),
    },
  ];
  const parts: string[] = [];
  let y = 10;
  for (const panel of panels) {
    parts.push(
      text({
        x: axis.plotX,
        y: y + 14,
        content: panel.title,
        weight: "bold",
        size: 15,
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
      parts.push(text({ x: axis.plotX, y: y + 13, content: caption, size: 13, fill: c.ink }));
      const mid = y + 28;
      if (mark) {
        parts.push(
          `<g class="period-mark"><line class="interval" x1="${num(axisX(mark.low, a))}" y1="${num(mid)}" x2="${num(axisX(mark.high, a))}" y2="${num(mid)}" stroke="${period.colour}" stroke-width="6" stroke-linecap="round" stroke-opacity="0.55"/>`,
          `<circle cx="${num(axisX(mark.value, a))}" cy="${num(mid)}" r="7" fill="${period.colour}" stroke="${c.ink}" stroke-width="1.5"/>`,
          text({
            x: axisX(mark.value, a),
            y: mid + 4,
            content: period.name,
            anchor: "middle",
            size: 9,
            weight: "bold",
            fill: "#ffffff",
          }),
          "</g>",
        );
      }
      y += 42;
    }
    parts.push(
      `<line x1="${num(a.plotX)}" y1="${num(y)}" x2="${num(a.plotX + a.plotWidth)}" y2="${num(y)}" stroke="${c.ink}" stroke-width="1"/>`,
      text({ x: a.plotX, y: y + 15, content: panel.format(0), size: 11, fill: c.muted }),
      text({
        x: a.plotX + a.plotWidth,
        y: y + 15,
        content: panel.title === "Largest share" ? "100%" : `${panel.axisMax}`,
        anchor: "end",
        size: 11,
        fill: c.muted,
      }),
    );
    y += 34;
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
