/**
 * @module svg
 * Small, dependency-free helpers the chart modules share: XML escaping for every piece of text
 * that reaches an SVG or HTML page, compact number output for coordinates, and the chart frame
 * (a responsive `viewBox` with a title and description for screen readers). Escaping follows the
 * XML 1.0 rules for character data and attribute values (W3C 2008, "Extensible Markup Language
 * (XML) 1.0 (Fifth Edition)", §2.4), common practice for generated markup.
 */
import { textWidth } from "./text-metrics.js";

/** Escapes text for XML/HTML character data and double-quoted attribute values. */
export function escapeXml(text: string): string {
  return text
    .replace(/&/g, "&amp;")
    .replace(/</g, "&lt;")
    .replace(/>/g, "&gt;")
    .replace(/"/g, "&quot;")
    .replace(/'/g, "&#39;");
}

/** A coordinate with at most two decimals, no trailing zeros ("12.5", "3"). */
export function num(x: number): string {
  const rounded = Math.round(x * 100) / 100;
  return Object.is(rounded, -0) ? "0" : String(rounded);
}

/** One `<text>` element; `anchor` is the SVG text-anchor. */
export function text(args: {
  x: number;
  y: number;
  content: string;
  anchor?: "start" | "middle" | "end";
  size?: number;
  weight?: "normal" | "bold";
  fill?: string;
  className?: string;
  /** A white outline behind the letters, so text stays legible over lines. */
  halo?: boolean;
}): string {
  const attrs = [
    `x="${num(args.x)}"`,
    `y="${num(args.y)}"`,
    args.anchor && args.anchor !== "start" ? `text-anchor="${args.anchor}"` : "",
    args.size ? `font-size="${num(args.size)}"` : "",
    args.weight === "bold" ? `font-weight="bold"` : "",
    args.fill ? `fill="${args.fill}"` : "",
    args.className ? `class="${args.className}"` : "",
    args.halo
      ? `stroke="#ffffff" stroke-width="3" stroke-linejoin="round" paint-order="stroke"`
      : "",
  ].filter((a) => a !== "");
  return `<text ${attrs.join(" ")}>${escapeXml(args.content)}</text>`;
}

/** The font stack of every chart: system sans-serif fonts only, nothing fetched. */
export const CHART_FONT =
  "system-ui, -apple-system, 'Segoe UI', Roboto, 'DejaVu Sans', Arial, sans-serif";

/**
 * Wraps chart content in a responsive `<svg>`: it scales with its container through `viewBox`
 * (no fixed pixel width), carries a title and a description, and names its kind in `data-chart`.
 */
export function svgFrame(args: {
  kind: string;
  width: number;
  height: number;
  title: string;
  description: string;
  body: string;
}): string {
  const id = `chart-${args.kind}`;
  return [
    `<svg xmlns="http://www.w3.org/2000/svg" viewBox="0 0 ${num(args.width)} ${num(args.height)}"`,
    ` width="${num(args.width)}" height="${num(args.height)}" role="img" data-chart="${escapeXml(args.kind)}"`,
    ` aria-labelledby="${id}-title ${id}-desc" font-family="${CHART_FONT}" font-size="14"`,
    ` style="max-width:100%;height:auto">`,
    `<title id="${id}-title">${escapeXml(args.title)}</title>`,
    `<desc id="${id}-desc">${escapeXml(args.description)}</desc>`,
    `<rect x="0" y="0" width="${num(args.width)}" height="${num(args.height)}" fill="#ffffff"/>`,
    args.body,
    "</svg>",
  ].join("");
}

/** Natural width of the page's charts: at 390 px screens (370 px of content) text shrinks to 80%. */
export const CHART_WIDTH = 460;
/** Smallest font size drawn in a chart (px at natural size); 13 × 370/460 ≥ 10 px on a phone. */
export const MIN_FONT = 13;
/** Size of a chart's visible title. */
export const TITLE_FONT = 15;

/** A chart's visible title, top left, bold. Returns the markup and the y below it. */
export function chartTitle(title: string, args: { x?: number; y?: number } = {}) {
  const x = args.x ?? 10;
  const y = args.y ?? 20;
  return {
    markup: text({
      x,
      y,
      content: title,
      size: TITLE_FONT,
      weight: "bold",
      className: "chart-title",
    }),
    bottom: Math.ceil(y + 0.25 * TITLE_FONT),
  };
}

/** One legend entry: a swatch drawn in a 22 × 14 px cell whose top left is (0, 0), and its words. */
export interface LegendItem {
  readonly swatch: string;
  readonly label: string;
}

/**
 * A legend laid out left to right, wrapping to a new row when an entry would pass `maxWidth`.
 * Returns the markup and the y below its last row.
 */
export function legend(
  items: readonly LegendItem[],
  args: { x: number; y: number; maxWidth: number },
) {
  const rowHeight = 20;
  let cx = args.x;
  let row = 0;
  const parts: string[] = [];
  for (const item of items) {
    const width = 22 + 5 + textWidth(item.label, MIN_FONT) + 16;
    if (cx > args.x && cx + width - 16 > args.x + args.maxWidth) {
      cx = args.x;
      row += 1;
    }
    const top = args.y + row * rowHeight;
    parts.push(
      `<g class="legend-item" transform="translate(${num(cx)},${num(top)})">${item.swatch}</g>`,
      text({ x: cx + 27, y: top + 11.5, content: item.label, size: MIN_FONT, fill: "#1a1a1a" }),
    );
    cx += width;
  }
  return {
    markup: `<g class="legend">${parts.join("")}</g>`,
    bottom: args.y + (row + 1) * rowHeight,
  };
}
