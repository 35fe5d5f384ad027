/**
 * @module render-text
 * Renders neutral blocks as plain text (CLI, console, logs). Bars: `■` up to the share, `·` on to
 * the interval's high end, `[` and `]` at the interval's ends, `|` where the line falls. Control
 * characters are escaped (`printable.ts`): labels and values, which may hold member ids, on one
 * line each; the whole text apart from its line breaks.
 */
import type { BarRow, Block } from "../domain/blocks.js";
import { printable, printableLine } from "./printable.js";

const BAR_WIDTH = 32;

function pad(text: string, width: number): string {
  return text.length >= width ? text : text + " ".repeat(width - text.length);
}

function bar(row: BarRow, scale: number, line: number | null): string {
  const at = (x: number) =>
    Math.max(0, Math.min(BAR_WIDTH - 1, Math.round((x / scale) * (BAR_WIDTH - 1))));
  const cells = Array.from({ length: BAR_WIDTH }, () => " ");
  const point = at(row.value);
  const high = at(row.high);
  for (let k = 0; k <= high; k++) cells[k] = k <= point && row.value > 0 ? "■" : "·";
  if (line !== null && line <= scale) {
    const l = at(line);
    if (cells[l] === " ") cells[l] = "|";
  }
  cells[at(row.low)] = "[";
  cells[high] = "]";
  return cells.join("");
}

export function renderText(blocks: readonly Block[]): string {
  const out: string[] = [];
  for (const block of blocks) {
    switch (block.kind) {
      case "heading":
        out.push(block.text, "=".repeat(Math.min(72, block.text.length)));
        break;
      case "note":
        out.push(block.text, "");
        break;
      case "figures": {
        const rows = block.rows.map((r) => ({
          label: printableLine(r.label),
          value: printableLine(r.value),
          detail: r.detail ? printableLine(r.detail) : "",
        }));
        const width = Math.max(...rows.map((r) => r.label.length)) + 2;
        for (const r of rows) {
          out.push(
            `${pad(r.label, width)}${r.value}${r.detail ? `  (${r.detail})` : ""}`.trimEnd(),
          );
        }
        out.push("");
        break;
      }
      case "bars": {
        out.push(block.caption);
        const scale = Math.min(
          1,
          Math.max(0.05, ...block.rows.map((r) => r.high), block.line ?? 0) * 1.05,
        );
        const labels = block.rows.map((r) => printableLine(r.label));
        const width = Math.max(...labels.map((label) => label.length)) + 2;
        block.rows.forEach((r, i) => {
          out.push(
            `  ${pad(labels[i], width)}${bar(r, scale, block.line)}  ${printableLine(r.text)}`,
          );
        });
        if (block.line !== null)
          out.push(
            `  ${pad("", width)}${" ".repeat(0)}| marks the line (${Math.round(block.line * 100)}%)`,
          );
        out.push("");
        break;
      }
      case "cautions":
        out.push(`Caution: ${block.text}`);
        break;
      case "footer":
        out.push(block.text);
        break;
    }
  }
  return `${printable(out.join("\n")).trimEnd()}\n`;
}
