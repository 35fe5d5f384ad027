/**
 * @module blocks-html
 * Renders neutral blocks (src/report/blocks.ts) as HTML for the report page: headings, notes,
 * figure tables, cautions and footers. Bars are left to the SVG charts and skipped here. Every
 * piece of text is escaped; nothing is taken as markup. Dates never break at their hyphens.
 */
import type { Block } from "../../domain/blocks.js";
import { escapeXml } from "./svg.js";

/** Wraps dates and date ranges of escaped text in a span that never breaks at a hyphen. */
export function keepDatesWhole(escaped: string): string {
  return escaped.replace(
    /\d{4}-\d{2}-\d{2}(?:(?:\.\.|–| to )\d{4}-\d{2}-\d{2})?/g,
    (date) => `<span class="nowrap">${date}</span>`,
  );
}

function safe(text: string): string {
  return keepDatesWhole(escapeXml(text));
}

/** HTML for the blocks; `headingLevel` is the level of `heading` blocks (2–4). */
export function blocksHtml(
  blocks: readonly Block[],
  options: { headingLevel?: 2 | 3 | 4 } = {},
): string {
  const h = `h${options.headingLevel ?? 3}`;
  const out: string[] = [];
  for (const block of blocks) {
    switch (block.kind) {
      case "heading":
        out.push(`<${h}>${safe(block.text)}</${h}>`);
        break;
      case "note":
        out.push(`<p>${safe(block.text)}</p>`);
        break;
      case "figures":
        out.push(
          `<table class="figures"><tbody>${block.rows
            .map(
              (r) =>
                `<tr><th scope="row">${safe(r.label.trim())}</th><td><strong>${safe(r.value)}</strong>${r.detail ? ` <span class="detail">${safe(r.detail)}</span>` : ""}</td></tr>`,
            )
            .join("")}</tbody></table>`,
        );
        break;
      case "cautions":
        out.push(`<p class="caution">${safe(block.text)}</p>`);
        break;
      case "footer":
        out.push(`<p class="footer">${safe(block.text)}</p>`);
        break;
      case "bars":
        break;
    }
  }
  return out.join("\n");
}
