/**
 * @module card-chart
 * The digest's chart as an image inside the Adaptive Card, given as a `data:` URL. Microsoft's
 * "Format your bot messages" (learn.microsoft.com/microsoftteams/platform/bots/how-to/format-your-
 * bot-messages) has put the bot message limit at 40 KB and now at 100 KB of UTF-16 payload, base64
 * images not counted; older guidance said about 28 KB for the whole message, so the card is kept
 * under 28 KB image included. resvg's anti-aliased RGBA PNG of a 15-member chart is about 45 KB even
 * at the chart's own 460 px, so the pixels are re-encoded as an indexed-colour PNG (the chart has
 * about a hundred distinct colours): about 8 KB for 15 members, the whole card about 15 KB.
 * Larger than `maxBytes`, or with more than 256 colours, the image is left out and the card says
 * the chart is missing.
 */

import type { Logger } from "../../src/ports/logger.js";
import { CHART_WIDTH } from "../../src/report/charts/svg.js";
import { type ChartRenderer, svgToRgba } from "../chart-image.js";
import { encodeIndexedPng } from "./png-encoder.js";

/** Pixel width of the card image: the chart's own width, so text stays at its drawn size. */
export const CARD_CHART_WIDTH = CHART_WIDTH;
/** Largest PNG put in a card; its base64 (4/3 of it) plus the card's text stays under 28 KB. */
export const CARD_CHART_MAX_BYTES = 16_000;

/** A renderer of card-sized chart PNGs; null, logged, when the chart cannot go in a card. */
export function cardChartRenderer(options: { logger: Logger; maxBytes?: number }): ChartRenderer {
  const maxBytes = options.maxBytes ?? CARD_CHART_MAX_BYTES;
  return (svg) => {
    const image = svgToRgba(svg, { logger: options.logger, width: CARD_CHART_WIDTH });
    if (image === null) return null;
    const png = encodeIndexedPng(image);
    if (png === null || png.length > maxBytes) {
      options.logger.warn(
        { bytes: png?.length ?? null, maxBytes },
        "chart image too large for a Teams card; posting text bars only",
      );
      return null;
    }
    return png;
  };
}
