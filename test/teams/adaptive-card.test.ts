import { describe, expect, it } from "vitest";
import { adaptiveCard, cardActivity, drawBar } from "../../adapters/teams/adaptive-card.js";
import type { OutgoingMessage } from "../../src/ports/chat-platform.js";

const message: OutgoingMessage = {
  text: "Balance digest\nfallback text",
  blocks: [
    { kind: "heading", text: "Balance digest" },
    { kind: "figures", rows: [{ label: "Effective voices", value: "3.2", detail: "of 5 active" }] },
    {
      kind: "bars",
      caption: "Influence shares",
      line: 0.4,
      rows: [{ label: "member 1", value: 0.3, low: 0.2, high: 0.45, text: "30% (20–45%)" }],
    },
    { kind: "cautions", text: "a rough proxy" },
    { kind: "footer", text: "influence explain" },
  ],
};

// Element and property names from the Adaptive Cards 1.5 schema (adaptivecards.io Schema Explorer).
describe("Adaptive Card rendering", () => {
  it("builds a 1.5 card with TextBlocks, a FactSet and monospace bars, and the text as fallback", () => {
    const card = adaptiveCard(message);
    expect(card).toMatchObject({
      type: "AdaptiveCard",
      version: "1.5",
      fallbackText: message.text,
    });
    expect(card.body.map((e) => e.type)).toEqual([
      "TextBlock",
      "FactSet",
      "TextBlock",
      "TextBlock",
      "TextBlock",
      "TextBlock",
    ]);
    expect(card.body[1]).toEqual({
      type: "FactSet",
      facts: [{ title: "Effective voices", value: "3.2 (of 5 active)" }],
    });
    expect(card.body[3]).toMatchObject({ fontType: "Monospace" });
    expect(String(card.body[3].text)).toContain("30% (20–45%)");
    expect(JSON.stringify(card)).not.toMatch(/"color"|"Image"|"url"/);
  });

  it("draws the share, the interval and the line", () => {
    const bar = drawBar({ label: "m", value: 0.5, low: 0.4, high: 0.75, text: "" }, 1, 0.9);
    expect(bar).toHaveLength(24);
    expect(bar.startsWith("############")).toBe(true);
    expect(bar).toContain("-");
    expect(bar.indexOf("|")).toBe(Math.round(0.9 * 23));
  });

  it("wraps the card as one attachment", () => {
    const activity = cardActivity(message);
    expect(activity.attachments).toHaveLength(1);
    expect(activity.attachments[0].contentType).toBe("application/vnd.microsoft.card.adaptive");
    expect(activity.summary).toBe("Balance digest");
  });
});
