/**
 * The proactive digest's card on Teams with its chart, against a nock'd Bot Framework connector at
 * the fixtures' serviceUrl: an Adaptive Card `Image` (adaptivecards.io Schema Explorer 1.5,
 * "Image": url, altText, size) right after the text bars, its `data:` URL holding a PNG (signature
 * and IHDR per W3C 2003, "Portable Network Graphics (PNG) Specification (Second Edition)", §5.2,
 * §11.2.2) at the chart's own width (460 px); when the chart cannot be rendered, a line saying so instead, and the digest
 * is posted all the same.
 */
import nock from "nock";
import { afterEach, describe, expect, it } from "vitest";
import { type ChartRenderer, svgToPng } from "../../adapters/chart-image.js";
import { CHART_MISSING_TEXT } from "../../adapters/teams/adaptive-card.js";
import {
  CHANNEL,
  CHANNEL_CONVERSATION,
  type ConnectorCall,
  fakeConnector,
  fixture,
  type Harness,
  startHarness,
} from "./harness.js";

let h: Harness;
let calls: ConnectorCall[];

afterEach(async () => {
  await h.close();
  nock.cleanAll();
  nock.enableNetConnect();
});

const MEMBERS = ["29:m-a", "29:m-b", "29:m-c", "29:m-d", "29:m-e", "29:m-f"];
const BARE = `/amer/v3/conversations/${encodeURIComponent(CHANNEL_CONVERSATION)}/activities`;

/** The bot installed; six members counted (never named) and 30 mentions round a circle. */
async function start(renderChart?: ChartRenderer): Promise<void> {
  nock.disableNetConnect();
  nock.enableNetConnect("127.0.0.1");
  calls = fakeConnector();
  h = await startHarness(renderChart ? { renderChart } : {});
  expect((await h.post(fixture("conversation-update-add.json"))).status).toBe(200);
  const at = Date.parse("2026-11-01T09:00:00Z");
  for (const [k, member] of MEMBERS.entries()) {
    await h.bot.onEvent(
      { type: "consent", at: at + k, channel: CHANNEL, member, level: "counted" },
      `consent-${k}`,
    );
  }
  for (let k = 0; k < 30; k++) {
    await h.bot.onEvent(
      {
        type: "message",
        at: at + 60_000 * (k + 1),
        channel: CHANNEL,
        id: `m${k}`,
        author: MEMBERS[k % 6],
        mentions: [MEMBERS[(k + 1 + (k % 2)) % 6]],
      },
      `message-${k}`,
    );
  }
}

interface Element {
  type: string;
  text?: string;
  url?: string;
  altText?: string;
  size?: string;
  fontType?: string;
}

async function digestCard(): Promise<Element[]> {
  const before = calls.length;
  h.clock.set(Date.parse("2026-11-02T09:00:30Z")); // Monday 09:00 UTC: the default digest slot
  const report = await h.bot.scheduler.tick();
  expect(report.failed).toEqual([]);
  expect(report.posted.filter((p) => p.kind === "digest")).toHaveLength(1);
  const posts = calls.slice(before).filter((c) => c.method === "POST" && c.path === BARE);
  expect(posts).toHaveLength(1);
  const body = posts[0].body as { attachments: { content: { body: Element[] } }[] };
  return body.attachments[0].content.body;
}

describe("the digest's chart in the Teams card", () => {
  it("is an Image after the bars, a data: URL of a PNG at the chart's own 460 px with its alt text", async () => {
    await start();
    const elements = await digestCard();
    const images = elements.filter((e) => e.type === "Image");
    expect(images).toHaveLength(1);
    const image = images[0];
    const at = elements.indexOf(image);
    expect(elements[at - 1].fontType).toBe("Monospace");
    expect(image.size).toBe("stretch");
    expect(image.altText).toMatch(/^Influence shares, largest first, with 90% intervals/);
    const prefix = "data:image/png;base64,";
    expect(image.url?.startsWith(prefix)).toBe(true);
    const png = Buffer.from((image.url ?? "").slice(prefix.length), "base64");
    expect([...png.subarray(0, 8)]).toEqual([0x89, 0x50, 0x4e, 0x47, 0x0d, 0x0a, 0x1a, 0x0a]);
    expect(png.subarray(12, 16).toString("ascii")).toBe("IHDR");
    expect(png.readUInt32BE(16)).toBe(460);
    expect(elements.some((e) => e.text === CHART_MISSING_TEXT)).toBe(false);
  });

  it("says the chart is missing when it cannot be rendered, and posts the digest once", async () => {
    // The real renderer on markup resvg rejects stands for any rendering failure.
    await start(() => svgToPng("<svg this is not xml", { logger: h.logger }));
    const elements = await digestCard();
    expect(elements.some((e) => e.type === "Image")).toBe(false);
    const missing = elements.findIndex((e) => e.text === CHART_MISSING_TEXT);
    expect(missing).toBeGreaterThan(0);
    expect(elements[missing - 1].fontType).toBe("Monospace");
    expect(h.logger.records.some((r) => r.message.startsWith("chart image failed"))).toBe(true);
  });
});
