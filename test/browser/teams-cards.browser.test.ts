/**
 * Every Teams card the bot can send, parsed and rendered by Microsoft's `adaptivecards` library
 * (3.0.6, the JavaScript renderer for HTML clients) inside Debian's Chromium: parsing must log no
 * warning or error in the library's SerializationContext (Adaptive Cards schema 1.5,
 * adaptivecards.io/explorer), and the rendered card must have a non-zero size. Messages with a
 * chart are checked with the real indexed-colour PNG and with the "chart missing" line. A
 * screenshot of each card is written to test/browser/artifacts/cards/ for review. Skips only when
 * Chromium is missing outside CI; in CI (`CI` set) it always runs.
 */

import { existsSync, mkdirSync } from "node:fs";
import { createRequire } from "node:module";
import { join } from "node:path";
import { type Browser, chromium, type Page } from "playwright-core";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { adaptiveCard, type CardChart } from "../../adapters/teams/adaptive-card.js";
import { cardChartRenderer } from "../../adapters/teams/card-chart.js";
import { silentLogger } from "../../src/ports/logger.js";
import { everyMessage, type NamedMessage } from "../support/every-message.js";

const CHROMIUM = "/usr/bin/chromium";
const ARTIFACTS = join(import.meta.dirname, "artifacts", "cards");
const LIBRARY = createRequire(import.meta.url).resolve("adaptivecards/dist/adaptivecards.min.js");
const skip = !existsSync(CHROMIUM) && !process.env.CI;

interface Parsed {
  readonly events: string[];
  readonly width: number;
  readonly height: number;
}

/** Parses and renders one card in the page; returns the library's events and the card's size. */
async function parseAndRender(page: Page, card: unknown): Promise<Parsed> {
  // Runs in the page (the test is typed without the DOM library, hence the string body).
  const script = `(() => {
    const json = ${JSON.stringify(card)};
    const AC = window.AdaptiveCards;
    const context = new AC.SerializationContext();
    const parsed = new AC.AdaptiveCard();
    parsed.parse(json, context);
    const events = [];
    for (let i = 0; i < context.eventCount; i++) {
      const e = context.getEventAt(i);
      events.push(String(e.phase) + "/" + String(e.event) + ": " + e.message);
    }
    const host = document.getElementById("host");
    host.innerHTML = "";
    const element = parsed.render();
    if (!element) return { events: events.concat("render returned nothing"), width: 0, height: 0 };
    host.appendChild(element);
    const box = element.getBoundingClientRect();
    return { events, width: box.width, height: box.height };
  })()`;
  return (await page.evaluate(script)) as Parsed;
}

describe.skipIf(skip)("Teams cards through the Adaptive Cards renderer in Chromium", () => {
  let browser: Browser;
  let page: Page;
  let messages: NamedMessage[];
  const chartPng = cardChartRenderer({ logger: silentLogger });

  beforeAll(async () => {
    mkdirSync(ARTIFACTS, { recursive: true });
    messages = await everyMessage();
    browser = await chromium.launch({
      executablePath: CHROMIUM,
      args: ["--headless", "--no-sandbox", "--disable-gpu", "--no-first-run"],
    });
    page = await browser.newPage({ viewport: { width: 480, height: 900 } });
    await page.setContent(
      '<!doctype html><html><body><div id="host" style="width:460px"></div></body></html>',
    );
    await page.addScriptTag({ path: LIBRARY });
  });

  afterAll(async () => {
    await browser?.close();
  });

  it("covers digests, notes, checks, compare, what-if, explain and help", () => {
    const names = messages.map((m) => m.name);
    for (const kind of [
      "digest",
      "note (channel)",
      "check",
      "compare",
      "whatif",
      "explain",
      "help",
    ]) {
      expect(names).toContain(kind);
    }
  });

  it("every card parses without a warning and renders", async () => {
    const failures: string[] = [];
    for (const { name, message } of messages) {
      const variants: [string, CardChart | undefined][] = [["", undefined]];
      if (message.chart) {
        const png = chartPng(message.chart.svg);
        expect(png, `${name}: chart rendered`).not.toBeNull();
        variants.push([" with chart", { png, alt: message.chart.alt }]);
        variants.push([" chart missing", { png: null, alt: message.chart.alt }]);
      }
      for (const [suffix, chart] of variants) {
        const result = await parseAndRender(page, adaptiveCard(message, chart));
        if (result.events.length > 0)
          failures.push(`${name}${suffix}: ${result.events.join("; ")}`);
        if (result.width <= 0 || result.height <= 0)
          failures.push(`${name}${suffix}: empty render`);
        const file = `${name}${suffix}`.replace(/[^a-z0-9]+/gi, "-").toLowerCase();
        await page.locator("#host").screenshot({ path: join(ARTIFACTS, `${file}.png`) });
      }
    }
    expect(failures).toEqual([]);
  });

  it("the library does report a problem when a card is wrong (the check can fail)", async () => {
    const bad = {
      type: "AdaptiveCard",
      version: "1.5",
      body: [{ type: "TextBlock", text: "x", size: "enormous" }, { type: "NoSuchElement" }],
    };
    const result = await parseAndRender(page, bad);
    expect(result.events.length).toBeGreaterThan(0);
  });
});
