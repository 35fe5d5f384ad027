/**
 * @module render-block-kit
 * Renders the neutral blocks as Slack Block Kit in plumbline's own plain layout: a heading and
 * notes as sections, figures as section fields (two columns, at most 10 per section), bars as
 * monospace lines from the text renderer inside a code block, cautions and footers as context.
 * No colours or emoji; a line about the chart image (it lives in the thread) can follow the bars.
 * Slack's limits are kept: 3,000 characters per section text, 2,000
 * per field, 50 blocks per message (docs.slack.dev Block Kit reference, "section" and "messages").
 */
import type { Block } from "../../src/domain/blocks.js";
import { renderText } from "../../src/report/render-text.js";

/** The subset of Block Kit this renderer produces. */
export type SlackBlock =
  | {
      readonly type: "section";
      readonly text?: SlackText;
      readonly fields?: readonly SlackText[];
    }
  | { readonly type: "context"; readonly elements: readonly SlackText[] }
  | { readonly type: "divider" };

export interface SlackText {
  readonly type: "mrkdwn" | "plain_text";
  readonly text: string;
}

export const MAX_SECTION_TEXT = 3000;
export const MAX_FIELD_TEXT = 2000;
export const MAX_FIELDS = 10;
export const MAX_BLOCKS = 50;

/** Escapes the three characters Slack's mrkdwn treats as control characters. */
export function escapeMrkdwn(text: string): string {
  return text.replace(/&/g, "&amp;").replace(/</g, "&lt;").replace(/>/g, "&gt;");
}

function clip(text: string, max: number): string {
  return text.length <= max ? text : `${text.slice(0, max - 1)}…`;
}

function plain(text: string, max = MAX_SECTION_TEXT): SlackText {
  return { type: "plain_text", text: clip(text, max) };
}

/** Monospace lines, split into code blocks that each fit one section. */
function codeSections(lines: readonly string[]): SlackBlock[] {
  const out: SlackBlock[] = [];
  let chunk: string[] = [];
  const flush = () => {
    if (chunk.length === 0) return;
    out.push({
      type: "section",
      text: { type: "mrkdwn", text: `\`\`\`${chunk.join("\n")}\`\`\`` },
    });
    chunk = [];
  };
  for (const raw of lines) {
    const line = clip(escapeMrkdwn(raw), MAX_SECTION_TEXT - 8);
    if ([...chunk, line].join("\n").length + 6 > MAX_SECTION_TEXT) flush();
    chunk.push(line);
  }
  flush();
  return out;
}

function renderOne(block: Block): SlackBlock[] {
  switch (block.kind) {
    case "heading":
      return [
        {
          type: "section",
          text: { type: "mrkdwn", text: clip(`*${escapeMrkdwn(block.text)}*`, MAX_SECTION_TEXT) },
        },
      ];
    case "note":
      return [{ type: "section", text: plain(block.text) }];
    case "figures": {
      const fields = block.rows.map((row) => {
        const value = row.detail ? `${row.value} (${row.detail})` : row.value;
        return {
          type: "mrkdwn" as const,
          text: clip(`*${escapeMrkdwn(row.label)}*\n${escapeMrkdwn(value)}`, MAX_FIELD_TEXT),
        };
      });
      const out: SlackBlock[] = [];
      for (let k = 0; k < fields.length; k += MAX_FIELDS) {
        out.push({ type: "section", fields: fields.slice(k, k + MAX_FIELDS) });
      }
      return out;
    }
    case "bars": {
      const lines = renderText([block]).trimEnd().split("\n");
      const [caption, ...rows] = lines;
      return [{ type: "section", text: plain(caption) }, ...codeSections(rows)];
    }
    case "cautions":
      return [{ type: "context", elements: [plain(`Caution: ${block.text}`)] }];
    case "footer":
      return [{ type: "context", elements: [plain(block.text)] }];
  }
}

export interface RenderOptions {
  /** A context line placed after the bars (or before the cautions when there are none). */
  readonly chartLine?: string;
}

function withChartLine(blocks: readonly Block[], line: string): SlackBlock[] {
  const note: SlackBlock = { type: "context", elements: [plain(line)] };
  const out: SlackBlock[] = [];
  let placed = false;
  for (const block of blocks) {
    if (!placed && (block.kind === "cautions" || block.kind === "footer")) {
      out.push(note);
      placed = true;
    }
    out.push(...renderOne(block));
    if (!placed && block.kind === "bars") {
      out.push(note);
      placed = true;
    }
  }
  if (!placed) out.push(note);
  return out;
}

/** Block Kit for a neutral message; the message's plain text goes alongside as `text`. */
export function renderBlockKit(
  blocks: readonly Block[],
  options: RenderOptions = {},
): SlackBlock[] {
  const out =
    options.chartLine === undefined
      ? blocks.flatMap(renderOne)
      : withChartLine(blocks, options.chartLine);
  if (out.length <= MAX_BLOCKS) return out;
  return [
    ...out.slice(0, MAX_BLOCKS - 1),
    { type: "context", elements: [plain("(Shortened to fit one Slack message.)")] },
  ];
}
