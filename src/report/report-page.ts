/**
 * @module report-page
 * The report as one self-contained HTML page (`plumbline report`, and `/reports/<token>` on the
 * bot): the figures of one `AnalysisReport`, its charts as inline SVG (shares, effective voices and
 * the largest share per week, the attention map, a compare's two periods), the meeting formats
 * (bands on the weekly charts and a comparison panel, format-panel.ts), the how to read and the
 * cautions. Every chart has a visible title, a legend, and its text equivalent: the table of what it
 * draws, beside it; on narrow screens the attention map becomes a ranked list. Inline CSS and SVG only, and a Content-Security-Policy that forbids every fetch, so the
 * page makes no network request and works offline. Members are labelled by the naming rules.
 */

import type { FormatsReport } from "../analysis/compare-formats.js";
import type { CompareReport } from "../analysis/compare-periods.js";
import type { Block } from "../domain/blocks.js";
import type { AttentionInput } from "../domain/counts.js";
import type { AnalysisReport } from "../domain/report.js";
import {
  type AttentionMapData,
  attentionMapChart,
  attentionMapData,
} from "./charts/attention-map.js";
import { bandLineChart, ticksUpTo } from "./charts/band-line-chart.js";
import { blocksHtml, keepDatesWhole } from "./charts/blocks-html.js";
import { compareChart } from "./charts/compare-chart.js";
import { PAGE_STYLE } from "./charts/page-style.js";
import { shareAxisMax, shareBarsChart } from "./charts/share-bars-chart.js";
import { escapeXml } from "./charts/svg.js";
import type { WeeklyPoint } from "./charts/weekly-series.js";
import { compareBlocks } from "./compare-blocks.js";
import { disclose } from "./disclosure.js";
import { explainBlocks } from "./explain-blocks.js";
import { decimal1, percent, percentRange } from "./format.js";
import { formatBands, formatsInWeek, formatsSection } from "./format-panel.js";
import { memberLabeller, type NamingPolicy, samePageLabels } from "./naming.js";
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
  /** The meeting formats compared: bands on the weekly charts and a panel of their own. */
  readonly formats?: FormatsReport | null;
  /** Epoch ms the page was made. */
  readonly generatedAt: number;
  /** A line saying who the page is for, e.g. "Shown only to you …". */
  readonly audience?: string;
}

function html(text: string): string {
  return keepDatesWhole(escapeXml(text));
}

/** The table a chart draws, folded under the chart: its text equivalent. */
function chartTable(
  caption: string,
  headers: readonly string[],
  rows: readonly (readonly string[])[],
): string {
  const head = headers.map((h) => `<th scope="col">${html(h)}</th>`).join("");
  const body = rows
    .map(
      (r) =>
        `<tr>${r.map((cell, k) => (k === 0 ? `<th scope="row">${html(cell)}</th>` : `<td>${html(cell)}</td>`)).join("")}</tr>`,
    )
    .join("");
  return `<details class="chart-table"><summary>Table: ${html(caption)}</summary><table><thead><tr>${head}</tr></thead><tbody>${body}</tbody></table></details>`;
}

function figure(svg: string | null, caption: string, table = "", className = ""): string {
  return svg === null
    ? ""
    : `<figure${className ? ` class="${className}"` : ""}>${svg}<figcaption>${html(caption)}</figcaption>${table}</figure>`;
}

function weekLabel(until: number): string {
  return new Date(until).toISOString().slice(5, 10);
}

function weekDay(until: number): string {
  return new Date(until).toISOString().slice(0, 10);
}

function historyCharts(
  history: readonly WeeklyPoint[],
  windowDays: number,
  formats: FormatsReport | null,
): string {
  if (history.length < 2 || history.every((p) => p.effectiveVoices === null)) {
    return "<p>Not enough weeks with figures yet for a trend.</p>";
  }
  // The voices axis ends at the most active members of any week: the most effective voices possible.
  const voicesTop = Math.max(
    2,
    ...history.map((p) => Math.max(p.members, p.effectiveVoices?.high ?? 0)),
  );
  const voicesStep = voicesTop <= 8 ? 2 : voicesTop <= 20 ? 5 : voicesTop <= 50 ? 10 : 20;
  const shareTop = Math.max(0.1, ...history.map((p) => Math.max(p.top?.high ?? 0, p.line ?? 0)));
  const line = history[history.length - 1].line;
  const shareSteps = Math.min(10, Math.ceil((shareTop * 1.1) / 0.1));
  const shareTicks = shareSteps > 6 && shareSteps % 2 === 0 ? shareSteps / 2 : shareSteps;
  const bands = formatBands(
    formats,
    history.map((p) => p.until),
  );
  const bandWords = bands.length > 0 ? " Hatched bands: the meeting format in force." : "";
  const voices = bandLineChart({
    kind: "effective-voices-trend",
    title: "Effective voices per week",
    description:
      "Effective voices at the end of each week over the retained history, with the interval as a band and the active members (the most possible) dotted; a dash marks weeks without figures.",
    points: history.map((p) => ({
      label: weekLabel(p.until),
      value: p.effectiveVoices?.value ?? null,
      low: p.effectiveVoices?.low ?? null,
      high: p.effectiveVoices?.high ?? null,
    })),
    yMax: voicesTop,
    yTickValues: ticksUpTo(voicesTop, voicesStep),
    format: decimal1,
    tickFormat: (v) => String(Math.round(v)),
    seriesLabel: "effective voices",
    intervalLabel: "interval",
    ceiling: { values: history.map((p) => p.members), label: "active members (most possible)" },
    bands,
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
    seriesLabel: "largest share",
    intervalLabel: "interval",
    reference: line === null ? null : { value: line, label: `line ${percent(line)}` },
    bands,
  });
  const voicesTable = chartTable(
    "effective voices per week",
    [
      "week ending",
      "effective voices",
      "interval",
      "active members",
      ...(formats ? ["format that week"] : []),
    ],
    history.map((p) => [
      weekDay(p.until),
      p.effectiveVoices ? decimal1(p.effectiveVoices.value) : "no figure",
      p.effectiveVoices
        ? `${decimal1(p.effectiveVoices.low)}–${decimal1(p.effectiveVoices.high)}`
        : "–",
      String(p.members),
      ...(formats ? [formatsInWeek(formats, p.until)] : []),
    ]),
  );
  const topTable = chartTable(
    "largest share per week",
    ["week ending", "largest share", "interval", "line", ...(formats ? ["format that week"] : [])],
    history.map((p) => [
      weekDay(p.until),
      p.top ? percent(p.top.share) : "no figure",
      p.top ? percentRange(p.top.low, p.top.high) : "–",
      p.line === null ? "–" : percent(p.line),
      ...(formats ? [formatsInWeek(formats, p.until)] : []),
    ]),
  );
  return `<div class="charts">${figure(voices, `Effective voices: how many evenly heard voices the channel's shared view is worth, each week, counting the ${windowDays} days before it.${bandWords}`, voicesTable)}${figure(top, `The largest single share each week; the dashed line is the line.${bandWords}`, topTable)}</div>`;
}

function sharesTable(
  report: AnalysisReport,
  policy: NamingPolicy,
  caption: string,
  maxRows = 20,
): string {
  const influence = report.influence ?? [];
  const label = memberLabeller(influence, policy);
  const interval = Math.round(report.settings.interval * 100);
  return chartTable(
    caption,
    ["member", "influence share", `${interval}% interval`],
    influence
      .slice(0, maxRows)
      .map((e) => [label(e.member), percent(e.share), percentRange(e.low, e.high)]),
  );
}

function compareSection(result: CompareReport, policy: NamingPolicy): string {
  const blocks = compareBlocks(result).filter((b) => b.kind !== "heading" && b.kind !== "cautions");
  // One axis for both periods' bars, so equal bar lengths mean equal shares.
  const rowsOf = (report: AnalysisReport) => (report.influence ?? []).slice(0, 12);
  const line = (report: AnalysisReport) => report.line?.threshold ?? null;
  const axisMax = Math.max(
    shareAxisMax(
      rowsOf(result.a.report).map((e) => ({ label: "", ...e })),
      line(result.a.report),
    ),
    shareAxisMax(
      rowsOf(result.b.report).map((e) => ({ label: "", ...e })),
      line(result.b.report),
    ),
  );
  const bars = (report: AnalysisReport, name: string, range: string) =>
    figure(
      // Each period's bars follow that period's disclosure rules (a join can leave one unnamed).
      disclose(report, policy).individual
        ? shareBarsChart(report, policy, {
            kind: `shares-${name.toLowerCase()}`,
            title: `Shares, period ${name}`,
            maxBars: 12,
            axisMax,
          })
        : null,
      `Period ${name}: ${range}; both periods on the same axis.`,
      sharesTable(report, policy, `shares, period ${name} ${range}`, 12),
    ) || `<p>Period ${html(name)} (${html(range)}) has no shares to show.</p>`;
  const marks = (r: AnalysisReport) => [
    r.effectiveVoices
      ? `${decimal1(r.effectiveVoices.value)} (${decimal1(r.effectiveVoices.low)}–${decimal1(r.effectiveVoices.high)})`
      : "no figures",
    r.top ? `${percent(r.top.share)} (${percentRange(r.top.low, r.top.high)})` : "no figures",
    String(r.members),
  ];
  const table = chartTable(
    "the two periods",
    ["period", "effective voices (interval)", "largest share (interval)", "active members"],
    [
      [`A ${result.a.range}`, ...marks(result.a.report)],
      [`B ${result.b.range}`, ...marks(result.b.report)],
    ],
  );
  return [
    `<section id="compare"><h2>Compare: A ${html(result.a.range)} against B ${html(result.b.range)}</h2>`,
    blocksHtml(blocks),
    `<div class="charts">${figure(compareChart(result), "Each period's figure with its interval on a common axis.", table)}</div>`,
    `<div class="charts">${bars(result.a.report, "A", result.a.range)}${bars(result.b.report, "B", result.b.range)}</div>`,
    "</section>",
  ].join("\n");
}

/** The map's narrow-screen form: members by share, each with who gives them most attention. */
function mapList(data: AttentionMapData): string {
  const items = data.members.map((m, k) => {
    const from = data.edges
      .filter((e) => e.to === k)
      .map(
        (e) =>
          `<span class="nowrap">${html(`${data.members[e.from].label} ${percent(e.weight)}`)}</span>`,
      );
    return `<li><strong>${html(m.label)}</strong> ${html(percent(m.share))}${m.aboveLine ? " (at or above the line)" : ""}${from.length > 0 ? `<br><span class="detail">most attention from: ${from.join(", ")}</span>` : ""}</li>`;
  });
  return `<div class="map-list"><h3>Who listens to whom</h3><p class="detail">Members by influence share; after each, the members who give them at least ${percent(0.15)} of their replies and mentions, with that part.</p><ol>${items.join("")}</ol>${data.notShown > 0 ? `<p class="detail">${data.notShown} members with smaller shares not shown.</p>` : ""}</div>`;
}

function mapTable(data: AttentionMapData): string {
  return chartTable(
    "arrows of the attention map",
    ["from", "to", "part of the sender's counted attention"],
    data.edges.map((e) => [
      data.members[e.from].label,
      data.members[e.to].label,
      percent(e.weight),
    ]),
  );
}

/** The whole page as an HTML string (UTF-8). */
export function reportPage(input: ReportPageInput): string {
  const { report, policy } = input;
  const summary: Block[] = summaryBlocks(report, policy).filter((b) => b.kind !== "heading");
  // The bars show individual shares: never where the figures above withhold them.
  const shares = figure(
    disclose(report, policy).individual ? shareBarsChart(report, policy) : null,
    `Bars: influence share. Whiskers: the ${Math.round(report.settings.interval * 100)}% interval. Dashed: the line.`,
    report.influence ? sharesTable(report, policy, "influence shares") : "",
  );
  const mapData =
    input.attention && report.influence && disclose(report, policy).individual
      ? attentionMapData({ report, input: input.attention, policy })
      : null;
  const map =
    input.attention && mapData
      ? figure(
          attentionMapChart({ report, input: input.attention, policy }),
          "Node area: influence share. Arrow width: the part of a member's counted replies and mentions that goes to the other member.",
          mapTable(mapData),
          "wide map",
        ) + mapList(mapData)
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
      ? `<section id="charts"><h2>Charts</h2><div class="charts">${shares}</div>${map}</section>`
      : "",
    input.history
      ? `<section id="history"><h2>Week by week</h2>${historyCharts(input.history, report.window.days, input.formats ?? null)}</section>`
      : "",
    input.formats ? formatsSection(input.formats) : "",
    input.compare
      ? compareSection(input.compare, samePageLabels(policy, report, input.compare))
      : "",
    `<section id="how-to-read"><h2>How to read</h2>${blocksHtml(explainBlocks().slice(1))}</section>`,
    "</main></body></html>",
    "",
  ].join("\n");
}
