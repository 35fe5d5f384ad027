/**
 * Every Slack message the bot can send, rendered as it is posted, against Block Kit's published
 * limits (Slack, Block Kit reference, docs.slack.dev/reference/block-kit: "blocks" — up to 50
 * blocks per message; section block — text up to 3,000 characters, fields up to 10 items of up to
 * 2,000 characters each; header block — text up to 150 characters; context block — up to 10
 * elements; and chat.postMessage, docs.slack.dev/reference/methods/chat.postMessage: `text` is the
 * fallback shown in notifications and to screen readers when blocks are sent, so it must be
 * present and non-empty). The limits are written here as numbers from that reference, not read
 * from the renderer's own constants.
 */
import { describe, expect, it } from "vitest";
import { renderBlockKit, type SlackBlock } from "../../adapters/slack/render-block-kit.js";
import { everyMessage } from "../support/every-message.js";

const LIMITS = {
  blocks: 50,
  sectionText: 3000,
  sectionFields: 10,
  fieldText: 2000,
  headerText: 150,
  contextElements: 10,
} as const;

function problems(blocks: readonly SlackBlock[], text: string): string[] {
  const found: string[] = [];
  if (blocks.length > LIMITS.blocks) found.push(`${blocks.length} blocks`);
  if (text.trim() === "") found.push("no fallback text");
  for (const [i, block] of blocks.entries()) {
    // Widened to every Block Kit type, so a header block (which this renderer does not make
    // today) would be checked too.
    const b = block as SlackBlock | { type: "header"; text: { text: string } };
    if (b.type === "section") {
      if (!b.text && !b.fields) found.push(`section ${i} has neither text nor fields`);
      if (b.text && b.text.text.length > LIMITS.sectionText) found.push(`section ${i} text long`);
      if (b.text && b.text.text.trim() === "") found.push(`section ${i} text empty`);
      if (b.fields && b.fields.length > LIMITS.sectionFields) found.push(`section ${i} fields`);
      for (const f of b.fields ?? []) {
        if (f.text.length > LIMITS.fieldText) found.push(`section ${i} field long`);
      }
    } else if (b.type === "context") {
      if (b.elements.length === 0 || b.elements.length > LIMITS.contextElements) {
        found.push(`context ${i} has ${b.elements.length} elements`);
      }
    } else if (b.type === "header") {
      if (b.text.text.length > LIMITS.headerText) found.push(`header ${i} long`);
    }
  }
  return found;
}

describe("Block Kit limits for every message the bot sends", async () => {
  const messages = await everyMessage();

  it("covers every kind of message", () => {
    expect(messages.length).toBeGreaterThanOrEqual(20);
    // Every meeting-format message (issue 16) is in the catalogue.
    expect(messages.map((m) => m.name)).toEqual(
      expect.arrayContaining([
        "format set",
        "format end",
        "format list",
        "compare formats",
        "format trial (plan)",
        "trial week switch",
        "trial result",
        "digest with format line",
      ]),
    );
  });

  for (const { name, message } of messages) {
    it(`${name}: within the limits, with a fallback text`, () => {
      expect(problems(renderBlockKit(message.blocks), message.text)).toEqual([]);
      expect(
        problems(renderBlockKit(message.blocks, { chartLine: "chart line" }), message.text),
      ).toEqual([]);
    });
  }

  it("a message far past 50 blocks is shortened to 50 and says so", () => {
    const many = Array.from({ length: 80 }, (_, k) => ({ kind: "note" as const, text: `n${k}` }));
    const blocks = renderBlockKit(many);
    expect(blocks).toHaveLength(LIMITS.blocks);
    expect(JSON.stringify(blocks.at(-1))).toContain("Shortened");
  });

  it("oversized content of every block kind is cut to the limits, not posted past them", () => {
    // No real message comes near 3,000 characters, so the clipping is fed content that does.
    const long = "w".repeat(5000);
    const blocks = renderBlockKit([
      { kind: "heading", text: long },
      { kind: "note", text: long },
      {
        kind: "figures",
        rows: Array.from({ length: 25 }, (_, k) => ({ label: `row ${k}`, value: long })),
      },
      { kind: "cautions", text: long },
      { kind: "footer", text: long },
    ]);
    expect(problems(blocks, "fallback")).toEqual([]);
    // The cut is at the limit, not far below it (a message is shortened, not emptied).
    const sectionTexts = blocks.flatMap((b) =>
      b.type === "section" && b.text ? [b.text.text] : [],
    );
    expect(sectionTexts.map((t) => t.length)).toEqual([LIMITS.sectionText, LIMITS.sectionText]);
    const fieldSections = blocks.filter((b) => b.type === "section" && b.fields);
    expect(fieldSections.map((b) => (b.type === "section" ? b.fields?.length : 0))).toEqual([
      10, 10, 5,
    ]);
  });

  it("the checker itself flags a block past a limit (it can fail)", () => {
    const long: SlackBlock = { type: "section", text: { type: "mrkdwn", text: "x".repeat(3001) } };
    expect(problems([long], "fallback")).toEqual(["section 0 text long"]);
    expect(problems([], " ")).toEqual(["no fallback text"]);
  });
});
