/**
 * @module respond
 * Small helpers that turn neutral blocks into a `CommandResponse`, with the plain-text fallback
 * rendered from the same blocks.
 */
import type { Block } from "../domain/blocks.js";
import { renderText } from "../report/render-text.js";
import type { CommandResponse, Visibility } from "./command-types.js";

/** A response made of blocks, private unless told otherwise. */
export function respond(
  blocks: readonly Block[],
  visibility: Visibility = "private",
): CommandResponse {
  return { visibility, message: { blocks, text: renderText(blocks) } };
}

/** A private response of plain sentences, one note block each. */
export function respondNotes(...texts: readonly string[]): CommandResponse {
  return respond(texts.map((text): Block => ({ kind: "note", text })));
}
