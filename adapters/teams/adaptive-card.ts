/**
 * @module adaptive-card
 * Renders neutral blocks as an Adaptive Card 1.5 (the card schema Teams renders; adaptivecards.io,
 * "Schema Explorer", version 1.5): headings and notes as wrapped TextBlocks, figures as a FactSet,
 * bars as monospace TextBlocks drawn with plain characters, cautions and footers small and subtle.
 * The card carries the plain text as `fallbackText`, so a client that cannot show it still reads
 * the message. Our own layout: no colours or icons; the one image is the digest's chart, placed
 * after the bars as an `Image` with a `data:` URL and its alternative text (or, when it could not
 * be made, a line saying it is missing).
 */

import type { BarRow, Block } from "../../src/domain/blocks.js";
import type { OutgoingMessage } from "../../src/ports/chat-platform.js";

export const ADAPTIVE_CARD_CONTENT_TYPE = "application/vnd.microsoft.card.adaptive";
export const ADAPTIVE_CARD_VERSION = "1.5";
const BAR_WIDTH = 24;

export type CardElement = Readonly<Record<string, unknown>>;

export interface AdaptiveCard {
  readonly type: "AdaptiveCard";
  readonly $schema: string;
  readonly version: string;
  readonly fallbackText: string;
  readonly body: readonly CardElement[];
}

/** A message activity body: one Adaptive Card attachment (the SDK's `Partial<Activity>` fits). */
export interface CardActivity {
  type: "message";
  summary: string;
  attachments: { contentType: string; content: AdaptiveCard }[];
}

function textBlock(value: string, extra: Record<string, unknown> = {}): CardElement {
  return { type: "TextBlock", text: value, wrap: true, ...extra };
}

/** One bar: `#` up to the share, `-` on to the interval's high end, `|` at the line. */
export function drawBar(row: BarRow, scale: number, line: number | null): string {
  const at = (x: number) =>
    Math.max(0, Math.min(BAR_WIDTH - 1, Math.round((x / scale) * (BAR_WIDTH - 1))));
  const cells = Array.from({ length: BAR_WIDTH }, () => ".");
  const point = at(row.value);
  const high = at(row.high);
  for (let k = 0; k <= high; k++) cells[k] = k <= point && row.value > 0 ? "#" : "-";
  if (line !== null && line <= scale) cells[at(line)] = "|";
  return cells.join("");
}

function barLines(block: Extract<Block, { kind: "bars" }>): string {
  const scale = Math.min(
    1,
    Math.max(0.05, ...block.rows.map((r) => r.high), block.line ?? 0) * 1.05,
  );
  const width = Math.max(0, ...block.rows.map((r) => r.label.length)) + 1;
  const lines = block.rows.map(
    (r) => `${r.label.padEnd(width)}${drawBar(r, scale, block.line)} ${r.text}`,
  );
  if (block.line !== null)
    lines.push(`${"".padEnd(width)}| marks the line (${Math.round(block.line * 100)}%)`);
  return lines.join("\n");
}

function element(block: Block): CardElement[] {
  switch (block.kind) {
    case "heading":
      return [textBlock(block.text, { size: "Medium", weight: "Bolder" })];
    case "note":
      return [textBlock(block.text)];
    case "figures":
      return [
        {
          type: "FactSet",
          facts: block.rows.map((r) => ({
            title: r.label,
            value: r.detail ? `${r.value} (${r.detail})` : r.value,
          })),
        },
      ];
    case "bars":
      return [
        textBlock(block.caption, { weight: "Bolder", spacing: "Medium" }),
        textBlock(barLines(block), { fontType: "Monospace", spacing: "Small" }),
      ];
    case "cautions":
      return [textBlock(`Caution: ${block.text}`, { size: "Small", isSubtle: true })];
    case "footer":
      return [textBlock(block.text, { size: "Small", isSubtle: true, spacing: "Medium" })];
  }
}

/** Said in place of the chart image when it could not be made. */
export const CHART_MISSING_TEXT =
  "Chart image missing (could not be rendered); the text bars above show the same figures.";

/** The message's chart as rendered by the adapter: PNG bytes, or null when rendering failed. */
export interface CardChart {
  readonly png: Buffer | null;
  readonly alt: string;
}

function chartElement(chart: CardChart): CardElement {
  if (chart.png === null) return textBlock(CHART_MISSING_TEXT, { size: "Small", isSubtle: true });
  return {
    type: "Image",
    url: `data:image/png;base64,${chart.png.toString("base64")}`,
    altText: chart.alt,
    size: "stretch",
    spacing: "Small",
  };
}

/** The Adaptive Card of a neutral message, with its chart after the bars when one is given. */
export function adaptiveCard(message: OutgoingMessage, chart?: CardChart): AdaptiveCard {
  const body: CardElement[] = [];
  let placed = chart === undefined;
  for (const block of message.blocks) {
    if (!placed && (block.kind === "cautions" || block.kind === "footer") && chart) {
      body.push(chartElement(chart));
      placed = true;
    }
    body.push(...element(block));
    if (!placed && block.kind === "bars" && chart) {
      body.push(chartElement(chart));
      placed = true;
    }
  }
  if (!placed && chart) body.push(chartElement(chart));
  return {
    type: "AdaptiveCard",
    $schema: "http://adaptivecards.io/schemas/adaptive-card.json",
    version: ADAPTIVE_CARD_VERSION,
    fallbackText: message.text,
    body,
  };
}

/** The activity that posts a neutral message as one card (text fallback on the card). */
export function cardActivity(message: OutgoingMessage, chart?: CardChart): CardActivity {
  const firstLine = message.text.split("\n").find((l) => l.trim() !== "") ?? "plumbline";
  return {
    type: "message",
    summary: firstLine.slice(0, 120),
    attachments: [
      { contentType: ADAPTIVE_CARD_CONTENT_TYPE, content: adaptiveCard(message, chart) },
    ],
  };
}
