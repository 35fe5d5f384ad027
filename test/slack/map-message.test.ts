/**
 * The depth bound of the rich_text walk. Slack's own blocks nest a handful of levels (block →
 * rich_text_list → rich_text_section → elements, per docs.slack.dev/reference/block-kit/blocks/
 * rich-text-block); anything past MAX_BLOCK_DEPTH is not walked and the text's `<@U…>` mentions
 * count instead, so no payload can cost a stack frame per level.
 */
import { describe, expect, it } from "vitest";
import { MAX_BLOCK_DEPTH, mentionsOf } from "../../adapters/slack/map-message.js";

/** A user element inside `levels` arrays, inside one rich_text block. */
function nested(levels: number): Record<string, unknown> {
  let node: unknown = { type: "user", user_id: "U0CY" };
  for (let k = 0; k < levels; k++) node = [node];
  return { text: "hi <@U0BO>", blocks: [{ type: "rich_text", elements: node }] };
}

describe("mentionsOf", () => {
  it("walks a real list block (list → section → elements)", () => {
    const message = {
      text: "ignored <@U0BO>",
      blocks: [
        {
          type: "rich_text",
          elements: [
            {
              type: "rich_text_list",
              style: "bullet",
              elements: [
                { type: "rich_text_section", elements: [{ type: "user", user_id: "U0CY" }] },
              ],
            },
          ],
        },
      ],
    };
    expect(mentionsOf(message)).toEqual({ ids: ["U0CY"], blocksTooDeep: false });
  });

  it("reads blocks up to the bound and the text beyond it", () => {
    // Depth counts the blocks array (0), the block (1) and its elements (2), then each array.
    const deepest = MAX_BLOCK_DEPTH - 2;
    expect(mentionsOf(nested(deepest))).toEqual({ ids: ["U0CY"], blocksTooDeep: false });
    expect(mentionsOf(nested(deepest + 1))).toEqual({ ids: ["U0BO"], blocksTooDeep: true });
  });

  it("returns at once on 200,000 levels, without recursion", () => {
    expect(mentionsOf(nested(200_000))).toEqual({ ids: ["U0BO"], blocksTooDeep: true });
  });
});
