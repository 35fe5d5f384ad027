/**
 * The report page in a real browser (playwright-core driving Debian's /usr/bin/chromium): the
 * generated file (file://) and the page served by the report route on 127.0.0.1. Every chart
 * renders with a non-zero size, nothing is logged to the console, the page requests nothing but
 * itself, and screenshots at desktop (1280×900) and phone (390×844) width are kept under
 * test/browser/artifacts/. Forged and expired links get 403. Skips only when Chromium is missing
 * outside CI; in CI (`CI` set) it always runs.
 */
import { existsSync, mkdirSync, writeFileSync } from "node:fs";
import { join } from "node:path";
import { pathToFileURL } from "node:url";
import { type Browser, chromium } from "playwright-core";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { runReport } from "../../adapters/local/cli-report.js";
import { demoLog } from "../../adapters/local/demo-scenario.js";
import { signReportToken } from "../../src/report/report-token.js";
import { CHANNEL, type RouteServer, startReportServer } from "../charts/route-fixture.js";

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

describe.skipIf(skip)("report page in Chromium", () => {
  let browser: Browser;
  let server: RouteServer;
  let fileUrl: string;

  beforeAll(async () => {
    mkdirSync(ARTIFACTS, { recursive: true });
    const log = join(ARTIFACTS, "demo.jsonl");
    writeFileSync(log, demoLog());
    const io = { stdout: () => {}, stderr: () => {}, env: {}, cwd: ARTIFACTS };
    // The demo names 10 of 13: k = 3 leaves enough unnamed for the share bars (DESIGN.md §7).
    await runReport([log, "--out", "report.html", "--samples", "200", "--min-members", "3"], io, {
      now: () => Date.UTC(2026, 11, 1),
    });
    fileUrl = pathToFileURL(join(ARTIFACTS, "report.html")).href;
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
  });

  afterAll(async () => {
    await browser?.close();
    await server?.close();
  });

  async function check(url: string, label: string, charts: readonly string[]) {
    for (const viewport of VIEWPORTS) {
      const page = await browser.newPage({
        viewport: { width: viewport.width, height: viewport.height },
      });
      const problems: string[] = [];
      const requests: string[] = [];
      page.on("console", (message) => {
        if (message.type() === "error" || message.type() === "warning")
          problems.push(message.text());
      });
      page.on("pageerror", (error) => problems.push(error.message));
      page.on("request", (request) => requests.push(request.url()));
      const response = await page.goto(url);
      if (response) expect(response.status() === 0 || response.ok()).toBe(true);
      for (const kind of charts) {
        const box = await page.locator(`svg[data-chart="${kind}"]`).boundingBox();
        expect(box, `${kind} at ${viewport.name}`).not.toBeNull();
        expect(box?.width ?? 0).toBeGreaterThan(0);
        expect(box?.height ?? 0).toBeGreaterThan(0);
        expect(box?.width ?? 0).toBeLessThanOrEqual(viewport.width);
      }
      // Runs in the page, where `document` exists; the test itself is typed without the DOM library.
      const scrollWidth = await page.evaluate("document.documentElement.scrollWidth");
      expect(Number(scrollWidth), `no sideways scrolling at ${viewport.name}`).toBeLessThanOrEqual(
        viewport.width,
      );
      expect(problems).toEqual([]);
      expect(requests.filter((r) => r !== url && !r.startsWith("data:"))).toEqual([]);
      await page.screenshot({
        path: join(ARTIFACTS, `${label}-${viewport.name}.png`),
        fullPage: true,
      });
      await page.close();
    }
  }

  it("renders the generated file offline", async () => {
    await check(fileUrl, "file", [
      "shares",
      "attention-map",
      "effective-voices-trend",
      "top-share-trend",
    ]);
  });

  it("renders the served page", async () => {
    await check(`${server.base}${server.route.linkFor(CHANNEL, "UBOSS")}`, "served", [
      "shares",
      "attention-map",
    ]);
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
