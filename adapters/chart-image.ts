/**
 * @module chart-image
 * Charts as PNG for chat posts (Slack file upload, Teams card image): the same SVG the report page
 * shows, rasterised by resvg (@resvg/resvg-js, a Rust SVG renderer) on a white background, by
 * default at twice its size for sharp phone screens, or to a given pixel width. Any failure is
 * logged (without the SVG, which may hold member names) and gives null, so the digest still posts
 * with its text bars.
 */
import { Resvg } from "@resvg/resvg-js";
import type { AnalysisReport } from "../src/domain/report.js";
import { type Logger, silentLogger } from "../src/ports/logger.js";
import { shareBarsChart } from "../src/report/charts/share-bars-chart.js";
import type { NamingPolicy } from "../src/report/naming.js";

export interface SvgToPngOptions {
  readonly logger?: Logger;
  /** Zoom factor over the SVG's own size; default 2. Ignored when `width` is set. */
  readonly scale?: number;
  /** Pixel width of the PNG (height follows the aspect ratio). */
  readonly width?: number;
}

/** A renderer from SVG markup to PNG bytes, null when it fails (injected into the platforms). */
export type ChartRenderer = (svg: string) => Buffer | null;

/** Decoded pixels: 4 bytes (R, G, B, A) per pixel, row by row. */
export interface RgbaImage {
  readonly width: number;
  readonly height: number;
  readonly rgba: Uint8Array;
}

function rendered(svg: string, options: SvgToPngOptions) {
  return new Resvg(svg, {
    fitTo:
      options.width !== undefined
        ? { mode: "width", value: options.width }
        : { mode: "zoom", value: options.scale ?? 2 },
    background: "#ffffff",
    font: {
      loadSystemFonts: true,
      defaultFontFamily: "DejaVu Sans",
      sansSerifFamily: "DejaVu Sans",
    },
  }).render();
}

function logFailure(logger: Logger, svg: string, error: unknown): void {
  logger.warn(
    { err: error instanceof Error ? error.message : String(error), svgLength: svg.length },
    "chart image failed; posting text bars only",
  );
}

/** The PNG of an SVG document; null, with a logged warning, when resvg cannot render it. */
export function svgToPng(svg: string, options: SvgToPngOptions = {}): Buffer | null {
  const logger = options.logger ?? silentLogger;
  try {
    return rendered(svg, options).asPng();
  } catch (error) {
    logFailure(logger, svg, error);
    return null;
  }
}

/** The raw pixels of an SVG document, for encoders of their own; null (logged) on failure. */
export function svgToRgba(svg: string, options: SvgToPngOptions = {}): RgbaImage | null {
  const logger = options.logger ?? silentLogger;
  try {
    const image = rendered(svg, options);
    return { width: image.width, height: image.height, rgba: image.pixels };
  } catch (error) {
    logFailure(logger, svg, error);
    return null;
  }
}

/** PNG of the report's share bars under the naming policy; null without shares or on failure. */
export function sharesChartPng(
  report: AnalysisReport,
  policy: NamingPolicy,
  options: { logger?: Logger; maxBars?: number; scale?: number; width?: number } = {},
): Buffer | null {
  const logger = options.logger ?? silentLogger;
  let svg: string | null;
  try {
    svg = shareBarsChart(report, policy, { maxBars: options.maxBars ?? 15 });
  } catch (error) {
    logger.warn(
      { err: error instanceof Error ? error.message : String(error), channel: report.channel },
      "share chart image failed; posting text bars only",
    );
    return null;
  }
  if (svg === null) return null;
  return svgToPng(svg, {
    logger,
    ...(options.scale !== undefined ? { scale: options.scale } : {}),
    ...(options.width !== undefined ? { width: options.width } : {}),
  });
}
