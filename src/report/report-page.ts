/**
 * @module report-page
 * The report as one self-contained HTML page (`plumbline report`, and `/reports/<token>` on the
 * bot): the figures of one `AnalysisReport`, its charts as inline SVG (shares, effective voices and
 * the largest share per week, the attention map, a compare's two periods), the how to read and the
 * cautions. Inline CSS and SVG only, and a Content-Security-Policy that forbids every fetch, so the
 * page makes no network request and works offline. Members are labelled by the naming rules.
 */

import type { CompareReport } from "../analysis/compare-periods.js";
import type { Block } from "../domain/blocks.js";
import type { AttentionInput } from "../domain/counts.js";
import type { AnalysisReport } from "../domain/report.js";
import { attentionMapChart } from "./charts/attention-map.js";
import { bandLineChart } from "./charts/band-line-chart.js";
import { blocksHtml } from "./charts/blocks-html.js";
import { compareChart } from "./charts/compare-chart.js";
import { PAGE_STYLE } from "./charts/page-style.js";
import { CHART_COLOURS } from "./charts/palette.js";
import { shareBarsChart } from "./charts/share-bars-chart.js";
import { escapeXml } from "./charts/svg.js";
import type { WeeklyPoint } from "./charts/weekly-series.js";
import { compareBlocks } from "./compare-blocks.js";
import { disclose } from "./disclosure.js";
import { explainBlocks } from "./explain-blocks.js";
import { decimal1, percent } from "./format.js";
import type { NamingPolicy } from "./naming.js";
import { summaryBlocks } from "./summary-blocks.js";

/** The page's Content-Security-Policy: nothing may be fetched; only the inline style applies. */
export const REPORT_PAGE_CSP =
  "default-src 'none'; style-src 'unsafe-inline'; img-src data:; base-uri 'none'; form-action 'none'";

export interface ReportPageInput {
  readonly report: AnalysisReport;
  /** Who may be named (DESIGN.md §6). */
  readonly policy: NamingPolicy;
  /** The attention counts behind `report` (`analyzeSnapshotDetailed(...).input`), for the map. */
  readonly attention?: AttentionInput | null;
  /** One point per week over the retained history (`weeklySeries`). */
  readonly history?: readonly WeeklyPoint[] | null;
  /** A compare of two periods, shown after the figures. */
  readonly compare?: CompareReport | null;
  /** Epoch ms the page was made. */
  readonly generatedAt: number;
  /** A line saying who the page is for, e.g. "Shown only to you …". */
  readonly audience?: string;
}

function figure(svg: string | null, caption: string): string {
  return svg === null
    ? ""
    : `<figure>${svg}<figcaption>${escapeXml(caption)}</figcaption></figure>`;
}

function weekLabel(until: number): string {
  return new Date(until).toISOString().slice(5, 10);
}

function historyCharts(history: readonly WeeklyPoint[]): string {
  if (history.length < 2 || history.every((p) => p.effectiveVoices === null)) {
    return "<p>Not enough weeks with figures yet for a trend.</p>";
  }
  const voicesMax = Math.max(
    2,
    ...history.map((p) => Math.max(p.members, p.effectiveVoices?.high ?? 0)),
  );
  const shareTop = Math.max(0.1, ...history.map((p) => Math.max(p.top?.high ?? 0, p.line ?? 0)));
  const line = history[history.length - 1].line;
  const voicesStep = voicesMax <= 8 ? 2 : voicesMax <= 20 ? 5 : 10;
  const voicesTop = Math.ceil(voicesMax / voicesStep) * voicesStep;
  const shareSteps = Math.min(10, Math.ceil((shareTop * 1.1) / 0.1));
  const shareTicks = shareSteps > 6 && shareSteps % 2 === 0 ? shareSteps / 2 : shareSteps;
  const voices = bandLineChart({
    kind: "effective-voices-trend",
    title: "Effective voices per week",
    description:
      "Effective voices at the end of each week over the retained history, with the interval as a band; a dash marks weeks without figures.",
    points: history.map((p) => ({
      label: weekLabel(p.until),
      value: p.effectiveVoices?.value ?? null,
      low: p.effectiveVoices?.low ?? null,
      high: p.effectiveVoices?.high ?? null,
    })),
    yMax: voicesTop,
    yTicks: voicesTop / voicesStep,
    format: decimal1,
  });
  const top = bandLineChart({
    kind: "top-share-trend",
    title: "Largest share per week",
    description:
      "The largest single influence share at the end of each week, with its interval as a band and the line dashed.",
    points: history.map((p) => ({
      label: weekLabel(p.until),
      value: p.top?.share ?? null,
      low: p.top?.low ?? null,
      high: p.top?.high ?? null,
    })),
    yMax: shareSteps / 10,
    yTicks: shareTicks,
    format: percent,
    reference: line === null ? null : { value: line, label: `line ${percent(line)}` },
    colour: CHART_COLOURS.line,
  });
  return `<div class="charts">${figure(voices, "Effective voices: how many evenly heard voices the pooled view is worth, each week's 28-day window.")}${figure(top, "The largest single share each week; the dashed line is the line.")}</div>`;
}

function compareSection(result: CompareReport, policy: NamingPolicy): string {
  const blocks = compareBlocks(result).filter((b) => b.kind !== "heading" && b.kind !== "cautions");
  // Each period's bars follow that period's disclosure rules (a join can leave one unnamed).
  const bars = (report: AnalysisReport, name: string, range: string) =>
    figure(
      disclose(report, policy).individual
        ? shareBarsChart(report, policy, {
            kind: `shares-${name.toLowerCase()}`,
            title: `Shares, period ${name} ${range}`,
            maxBars: 12,
          })
        : null,
      `Period ${name}: ${range}`,
    ) || `<p>Period ${name} (${escapeXml(range)}) has no shares to show.</p>`;
  return [
    `<section id="compare"><h2>${escapeXml(`Compare: A ${result.a.range} against B ${result.b.range}`)}</h2>`,
    blocksHtml(blocks),
    `<div class="charts">${figure(compareChart(result), "Each period's figure with its interval on a common axis.")}</div>`,
    `<div class="charts">${bars(result.a.report, "A", result.a.range)}${bars(result.b.report, "B", result.b.range)}</div>`,
    "</section>",
  ].join("\n");
}

/** The whole page as an HTML string (UTF-8). */
export function reportPage(input: ReportPageInput): string {
  const { report, policy } = input;
  const summary: Block[] = summaryBlocks(report, policy).filter((b) => b.kind !== "heading");
  // The bars show individual shares: never where the figures above withhold them.
  const shares = figure(
    disclose(report, policy).individual ? shareBarsChart(report, policy) : null,
    `Bars: influence share. Whiskers: the ${Math.round(report.settings.interval * 100)}% interval. Dashed: the line.`,
  );
  const map =
    input.attention && report.influence && disclose(report, policy).individual
      ? figure(
          attentionMapChart({ report, input: input.attention, policy }),
          "Node area: influence share. Arrow width: the part of a member's counted replies and mentions that goes to the other member.",
        )
      : "";
  const title = `Influence balance · ${report.channel}`;
  const generated = new Date(input.generatedAt).toISOString().replace("T", " ").slice(0, 16);
  return [
    "<!doctype html>",
    '<html lang="en"><head><meta charset="utf-8">',
    `<meta http-equiv="Content-Security-Policy" content="${REPORT_PAGE_CSP}">`,
    '<meta name="viewport" content="width=device-width, initial-scale=1">',
    '<meta name="referrer" content="no-referrer">',
    `<title>${escapeXml(title)}</title>`,
    `<style>${PAGE_STYLE}</style></head><body>`,
    `<header><h1>${escapeXml(title)}</h1><p class="meta">Made by plumbline on ${generated} UTC from replies and mentions between opted-in members; no message text.</p></header>`,
    input.audience ? `<p class="audience">${escapeXml(input.audience)}</p>` : "",
    `<main><section id="figures"><h2>Figures</h2>${blocksHtml(summary)}</section>`,
    shares || map
      ? `<section id="charts"><h2>Charts</h2><div class="charts">${shares}${map}</div></section>`
      : "",
    input.history
      ? `<section id="history"><h2>Week by week</h2>${historyCharts(input.history)}</section>`
      : "",
    input.compare ? compareSection(input.compare, policy) : "",
    `<section id="how-to-read"><h2>How to read</h2>${blocksHtml(explainBlocks().slice(1))}</section>`,
    "</main></body></html>",
    "",
  ].join("\n");
}
