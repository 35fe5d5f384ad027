/**
 * @module chart-image
 * The share bars as a PNG for chat posts (Slack file upload, Teams card image): the same SVG the
 * report page shows, rasterised by resvg (@resvg/resvg-js, a Rust SVG renderer) at twice its
 * size for sharp phone screens. Any failure is logged and gives null, so the digest still posts
 * with its text bars.
 */
import { Resvg } from "@resvg/resvg-js";
import type { AnalysisReport } from "../src/domain/report.js";
import { type Logger, silentLogger } from "../src/ports/logger.js";
import { shareBarsChart } from "../src/report/charts/share-bars-chart.js";
import type { NamingPolicy } from "../src/report/naming.js";

/** PNG of the report's share bars under the naming policy; null without shares or on failure. */
export function sharesChartPng(
  report: AnalysisReport,
  policy: NamingPolicy,
  options: { logger?: Logger; maxBars?: number; scale?: number } = {},
): Buffer | null {
  const logger = options.logger ?? silentLogger;
  try {
    const svg = shareBarsChart(report, policy, { maxBars: options.maxBars ?? 15 });
    if (svg === null) return null;
    const resvg = new Resvg(svg, {
      fitTo: { mode: "zoom", value: options.scale ?? 2 },
      background: "#ffffff",
      font: {
        loadSystemFonts: true,
        defaultFontFamily: "DejaVu Sans",
        sansSerifFamily: "DejaVu Sans",
      },
    });
    return resvg.render().asPng();
  } catch (error) {
    logger.warn(
      { err: error instanceof Error ? error.message : String(error), channel: report.channel },
      "share chart image failed; posting text bars only",
    );
    return null;
  }
}
