/**
 * @module blocks-html
 * Renders neutral blocks (src/report/blocks.ts) as HTML for the report page: headings, notes,
 * figure tables, cautions and footers. Bars are left to the SVG charts and skipped here. Every
 * piece of text is escaped; nothing is taken as markup.
 */
import type { Block } from "../../domain/blocks.js";
import { escapeXml } from "./svg.js";

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
        out.push(`<${h}>${escapeXml(block.text)}</${h}>`);
        break;
      case "note":
        out.push(`<p>${escapeXml(block.text)}</p>`);
        break;
      case "figures":
        out.push(
          `<table class="figures"><tbody>${block.rows
            .map(
              (r) =>
                `<tr><th scope="row">${escapeXml(r.label.trim())}</th><td><strong>${escapeXml(r.value)}</strong>${r.detail ? ` <span class="detail">${escapeXml(r.detail)}</span>` : ""}</td></tr>`,
            )
            .join("")}</tbody></table>`,
        );
        break;
      case "cautions":
        out.push(`<p class="caution">${escapeXml(block.text)}</p>`);
        break;
      case "footer":
        out.push(`<p class="footer">${escapeXml(block.text)}</p>`);
        break;
      case "bars":
        break;
    }
  }
  return out.join("\n");
}
