/**
 * The report page and the chat chart images in a real browser (playwright-core driving Debian's
 * /usr/bin/chromium), on the demo's log and on generated 18- and 60-member channels
 * (bench/synthetic-channel.ts), at desktop (1280×900) and phone (390×844) width. For every visible
 * chart: no two SVG text boxes overlap, no text box or rendered font is under 10 px, no text leaves
 * its chart; axe-core (Deque, 4.x) finds no serious or critical violation; the page requests
 * nothing but itself, logs nothing and never scrolls sideways; at phone width the attention map
 * gives way to its ranked list; the demo's meeting formats appear as named bands on both weekly
 * charts and as the formats panel, at both widths. Each chart's screenshot is written to test/browser/artifacts/ for
 * review. The PNGs sent to Slack (twice the chart's size) and Teams (the chart's own width) get the
 * same text checks at the PNG's own scale. The text-width estimates of text-metrics.ts are checked
 * against Chromium's layout. Forged and expired links get 403. Skips only when Chromium is missing
 * outside CI; in CI (`CI` set) it always runs.
 */
import { existsSync, mkdirSync, writeFileSync } from "node:fs";
import { join } from "node:path";
import { pathToFileURL } from "node:url";
import { type Browser, chromium } from "playwright-core";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { svgToPng } from "../../adapters/chart-image.js";
import { runReport } from "../../adapters/local/cli-report.js";
import {
  DEMO_CHANNEL,
  demoEvents,
  demoLog,
  demoRanges,
} from "../../adapters/local/demo-scenario.js";
import { cardChartRenderer } from "../../adapters/teams/card-chart.js";
import { syntheticChannel } from "../../bench/synthetic-channel.js";
import { parseDateRange } from "../../src/domain/date-range.js";
import type { AnalysisReport } from "../../src/domain/report.js";
import { DAY_MS, DEFAULT_SETTINGS } from "../../src/domain/settings.js";
import { MemoryLogger } from "../../src/ports/logger.js";
import { analyzeForPage } from "../../src/report/charts/page-analysis.js";
import { CHART_FONT } from "../../src/report/charts/svg.js";
import { textWidth } from "../../src/report/charts/text-metrics.js";
import { digestMessage } from "../../src/report/digest-blocks.js";
import { reportPage } from "../../src/report/report-page.js";
import { signReportToken } from "../../src/report/report-token.js";
import { CHANNEL, type RouteServer, startReportServer } from "../charts/route-fixture.js";
import { snapshotOf } from "../report/log-builders.js";
import {
  type ChartBoxes,
  measureCharts,
  outside,
  overlaps,
  seriousAxeViolations,
  tooSmall,
} from "./chart-checks.js";

const CHROMIUM = "/usr/bin/chromium";
const ARTIFACTS = join(import.meta.dirname, "artifacts");
const skip = !existsSync(CHROMIUM) && !process.env.CI;
if (skip) {
  console.warn(
    `browser tests skipped: ${CHROMIUM} is missing (install it with apt-get install -y chromium; in CI they run)`,
  );
}

const VIEWPORTS = [
  { name: "desktop", width: 1280, height: 900 },
  { name: "phone", width: 390, height: 844 },
] as const;

const MAIN_CHARTS = ["shares", "attention-map", "effective-voices-trend", "top-share-trend"];
const COMPARE_CHARTS = ["compare", "shares-a", "shares-b"];
const NOW = Date.UTC(2026, 11, 1);

interface Scenario {
  readonly name: string;
  readonly url: string;
  readonly report: AnalysisReport;
  readonly charts: readonly string[];
}

/** A generated channel of `members` over 8 weeks, with a compare of its two halves. */
function generatedScenario(members: number, messages: number): Scenario {
  const channel = syntheticChannel({
    members,
    messages,
    days: 56,
    seed: members,
    channel: `gen-${members}`,
  });
  const snapshot = snapshotOf(channel.events, channel.channel);
  const ranges = {
    a: parseDateRange("2026-11-02..2026-11-29"),
    b: parseDateRange("2026-11-30..2026-12-27"),
  };
  const analysis = analyzeForPage(
    snapshot,
    { ...DEFAULT_SETTINGS, samples: 100, seed: members },
    { until: channel.until + DAY_MS / 2, ranges, historyWeeks: 8 },
  );
  const file = join(ARTIFACTS, `gen-${members}.html`);
  writeFileSync(file, reportPage({ ...analysis, policy: { namesOn: true }, generatedAt: NOW }));
  return {
    name: `gen-${members}`,
    url: pathToFileURL(file).href,
    report: analysis.report,
    charts: [...MAIN_CHARTS, ...COMPARE_CHARTS],
  };
}

function problemsOf(charts: readonly ChartBoxes[]) {
  return charts.flatMap((c) => [
    ...overlaps(c.texts).map((p) => `${c.kind}: overlap ${p}`),
    ...tooSmall(c.texts).map((p) => `${c.kind}: small ${p}`),
    ...outside(c).map((p) => `${c.kind}: outside ${p}`),
  ]);
}

describe.skipIf(skip)("report page in Chromium", () => {
  let browser: Browser;
  let server: RouteServer;
  const scenarios: Scenario[] = [];

  beforeAll(async () => {
    mkdirSync(ARTIFACTS, { recursive: true });
    const log = join(ARTIFACTS, "demo.jsonl");
    writeFileSync(log, demoLog());
    const io = { stdout: () => {}, stderr: () => {}, env: {}, cwd: ARTIFACTS };
    const ranges = demoRanges();
    await runReport(
      [
        log,
        "--out",
        "demo.html",
        "--samples",
        "200",
        "--min-members",
        "3",
        "--a",
        ranges.a.label,
        "--b",
        ranges.b.label,
      ],
      io,
      { now: () => NOW },
    );
    // The digest's report of the same log, for the chat images.
    const demo = analyzeForPage(
      snapshotOf(demoEvents(), DEMO_CHANNEL),
      { ...DEFAULT_SETTINGS, samples: 200 },
      { historyWeeks: 1 },
    );
    scenarios.push(
      {
        name: "demo",
        url: pathToFileURL(join(ARTIFACTS, "demo.html")).href,
        report: demo.report,
        charts: [...MAIN_CHARTS, ...COMPARE_CHARTS],
      },
      generatedScenario(18, 1800),
      generatedScenario(60, 5000),
    );
    server = await startReportServer();
    browser = await chromium.launch({
      executablePath: CHROMIUM,
      args: [
        "--headless",
        "--no-sandbox",
        "--disable-gpu",
        "--disable-quic",
        "--no-first-run",
        "--disable-background-networking",
        "--disable-component-update",
        "--disable-sync",
      ],
    });
    // Three full reports with their weekly histories and the demo's formats: minutes, not
    // seconds, on a shared machine.
  }, 600_000);

  afterAll(async () => {
    await browser?.close();
    await server?.close();
  });

  async function check(url: string, label: string, charts: readonly string[], formats = false) {
    for (const viewport of VIEWPORTS) {
      const context = await browser.newContext({
        viewport: { width: viewport.width, height: viewport.height },
        // axe-core is injected as a script, which the page's own CSP forbids.
        bypassCSP: true,
      });
      const page = await context.newPage();
      const problems: string[] = [];
      const requests: string[] = [];
      page.on("console", (message) => {
        // With the CSP bypassed (for axe), Chromium asks the server for /favicon.ico; the page
        // itself requests nothing, which the request check below shows.
        if (message.location().url.endsWith("/favicon.ico")) return;
        if (message.type() === "error" || message.type() === "warning")
          problems.push(message.text());
      });
      page.on("pageerror", (error) => problems.push(error.message));
      page.on("request", (request) => requests.push(request.url()));
      const response = await page.goto(url);
      if (response) expect(response.status() === 0 || response.ok()).toBe(true);
      const phone = viewport.name === "phone";
      const expected = charts.filter((k) => !(phone && k === "attention-map"));
      const measured = await measureCharts(page);
      expect(measured.map((c) => c.kind).sort(), `${label} at ${viewport.name}`).toEqual(
        [...expected].sort(),
      );
      for (const chart of measured) {
        expect(chart.box.width).toBeGreaterThan(0);
        expect(chart.box.width).toBeLessThanOrEqual(viewport.width);
        expect(chart.texts.length, `${chart.kind} has text`).toBeGreaterThan(3);
      }
      expect(problemsOf(measured), `${label} at ${viewport.name}`).toEqual([]);
      if (charts.includes("attention-map")) {
        expect(await page.locator(".map-list").isVisible()).toBe(phone);
        expect(await page.locator('svg[data-chart="attention-map"]').isVisible()).toBe(!phone);
      }
      // The meeting formats (the demo's two): bands named on both weekly charts, and the panel
      // laid out with a size, its table readable without sideways scrolling.
      if (formats) {
        for (const kind of ["effective-voices-trend", "top-share-trend"]) {
          const names = await page
            .locator(`svg[data-chart="${kind}"] text.band-label`)
            .allTextContents();
          expect(names, `${label} ${kind} at ${viewport.name}`).toEqual([
            "coordinator-led",
            "rotating-hosts",
          ]);
        }
        const panel = await page.locator("#formats").boundingBox();
        expect(panel?.width ?? 0).toBeGreaterThan(0);
        expect(panel?.height ?? 0).toBeGreaterThan(100);
        expect(await page.locator("#formats table.formats tbody tr").count()).toBe(2);
        expect(await page.locator("#formats table.formats").isVisible()).toBe(true);
        expect(await page.locator("#formats").textContent()).toContain(
          "spread influence more evenly",
        );
      } else {
        expect(await page.locator("#formats").count()).toBe(0);
      }
      // Every chart has its text equivalent: a table beside it.
      const figures = await page.locator("figure:has(svg[data-chart])").count();
      expect(
        await page.locator("figure:has(svg[data-chart]) details.chart-table table").count(),
      ).toBe(figures);
      const scrollWidth = await page.evaluate("document.documentElement.scrollWidth");
      expect(Number(scrollWidth), `no sideways scrolling at ${viewport.name}`).toBeLessThanOrEqual(
        viewport.width,
      );
      for (const kind of expected) {
        await page
          .locator(`svg[data-chart="${kind}"]`)
          .screenshot({ path: join(ARTIFACTS, `${label}-${viewport.name}-${kind}.png`) });
      }
      await page.screenshot({
        path: join(ARTIFACTS, `${label}-${viewport.name}.png`),
        fullPage: true,
      });
      // Whole sections too (docs/images/ copies the demo's, see docs/report-page.md).
      for (const section of formats ? ["charts", "history", "formats"] : ["charts", "history"]) {
        await page.locator(`#${section}`).screenshot({
          path: join(ARTIFACTS, `${label}-${viewport.name}-section-${section}.png`),
        });
      }
      expect(await seriousAxeViolations(page), `axe at ${viewport.name}`).toEqual([]);
      expect(problems).toEqual([]);
      expect(requests.filter((r) => r !== url && !r.startsWith("data:"))).toEqual([]);
      await context.close();
    }
  }

  it("renders the demo's report with a compare, offline", async () => {
    const demo = scenarios[0];
    await check(demo.url, demo.name, demo.charts, true);
  });

  it("renders a generated 18-member channel", async () => {
    const s = scenarios[1];
    expect(s.report.members).toBe(18);
    await check(s.url, s.name, s.charts);
  });

  it("renders a generated 60-member channel", async () => {
    const s = scenarios[2];
    expect(s.report.members).toBe(60);
    await check(s.url, s.name, s.charts);
  });

  it("renders the served page", async () => {
    await check(`${server.base}${server.route.linkFor(CHANNEL, "UBOSS")}`, "served", MAIN_CHARTS);
  });

  it("sends chat images whose text is readable and never overlaps at the PNG's own size", async () => {
    const teams = cardChartRenderer({ logger: new MemoryLogger() });
    const page = await browser.newPage();
    for (const s of scenarios) {
      const message = digestMessage({
        report: s.report,
        previous: null,
        policy: { namesOn: true },
      });
      const svg = message.chart?.svg ?? "";
      expect(svg).toContain("<svg");
      const viewBox = /viewBox="0 0 ([\d.]+) ([\d.]+)"/.exec(svg);
      const [vw, vh] = [Number(viewBox?.[1]), Number(viewBox?.[2])];
      const images = [
        { platform: "slack", png: svgToPng(svg) },
        { platform: "teams", png: teams(svg) },
      ];
      for (const { platform, png } of images) {
        expect(png, `${s.name} ${platform}`).not.toBeNull();
        const bytes = png ?? Buffer.alloc(0);
        expect(bytes.subarray(12, 16).toString("ascii")).toBe("IHDR");
        const width = bytes.readUInt32BE(16);
        const height = bytes.readUInt32BE(20);
        expect(Math.abs(height - (width * vh) / vw)).toBeLessThanOrEqual(1);
        writeFileSync(join(ARTIFACTS, `${s.name}-${platform}-chart.png`), bytes);
        // The same SVG laid out at the PNG's pixel size: the text the image carries.
        const sized = svg.replace(
          /^<svg ([^>]*?)width="[\d.]+" height="[\d.]+"/,
          `<svg $1width="${width}" height="${height}"`,
        );
        await page.setViewportSize({ width, height: Math.min(height, 4000) });
        await page.setContent(`<!doctype html><body style="margin:0">${sized}</body>`);
        const measured = await measureCharts(page);
        expect(measured).toHaveLength(1);
        expect(measured[0].box.width).toBeCloseTo(width, 0);
        expect(problemsOf(measured), `${s.name} ${platform} image`).toEqual([]);
      }
    }
    await page.close();
  });

  it("estimates text widths from 1% under to 6% over Chromium's layout", async () => {
    // An estimate may err wide (labels keep more air) but hardly narrow (labels could touch).
    const page = await browser.newPage();
    const samples = ["member 11", "15% (12–18%)", "Effective voices per week", "11-27", "line 30%"];
    await page.setContent(
      `<svg xmlns="http://www.w3.org/2000/svg" width="900" height="400" font-family="${CHART_FONT}">${samples
        .map(
          (s, k) =>
            `<text x="0" y="${30 + k * 30}" font-size="13">${s}</text><text x="400" y="${30 + k * 30}" font-size="13" font-weight="bold">${s}</text>`,
        )
        .join("")}</svg>`,
    );
    const widths = (await page.evaluate(
      `[...document.querySelectorAll("text")].map((t) => t.getBBox().width)`,
    )) as number[];
    samples.forEach((s, k) => {
      for (const [weight, measured] of [
        ["normal", widths[2 * k]],
        ["bold", widths[2 * k + 1]],
      ] as const) {
        const ratio = textWidth(s, 13, weight) / measured;
        expect(ratio, `${s} ${weight}`).toBeGreaterThan(0.99);
        expect(ratio, `${s} ${weight}`).toBeLessThan(1.06);
      }
    });
    await page.close();
  });

  it("answers forged and expired links with 403", async () => {
    const page = await browser.newPage();
    const forged = signReportToken({
      channel: CHANNEL,
      reader: "UBOSS",
      now: server.clock.now(),
      secret: "not-the-server-secret-0123",
    });
    expect((await page.goto(`${server.base}/reports/${forged}`))?.status()).toBe(403);
    const link = server.route.linkFor(CHANNEL, "UBOSS");
    const start = server.clock.now();
    server.clock.set(start + 24 * 3_600_000);
    expect((await page.goto(`${server.base}${link}`))?.status()).toBe(403);
    expect(await page.textContent("h1")).toContain("does not work");
    server.clock.set(start);
    await page.close();
  });
});
