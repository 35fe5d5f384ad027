/**
 * `/reports/<token>` served by a real node:http server: a valid link shows the page under the
 * naming rules for its reader; a forged, tampered or expired link gets a plain 403 page.
 */
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { signReportToken } from "../../src/report/report-token.js";
import { CHANNEL, type RouteServer, startReportServer } from "./route-fixture.js";

let server: RouteServer;
beforeAll(async () => {
  server = await startReportServer();
});
afterAll(async () => {
  await server.close();
});

async function get(path: string, init?: RequestInit) {
  const response = await fetch(`${server.base}${path}`, init);
  return { status: response.status, headers: response.headers, body: await response.text() };
}

describe("report route", () => {
  it("serves a facilitator the page with named members named and counted ones not", async () => {
    const link = server.route.linkFor(CHANNEL, "UBOSS");
    expect(link).toMatch(/^\/reports\/[A-Za-z0-9_-]+\.[A-Za-z0-9_-]+$/);
    const page = await get(link);
    expect(page.status).toBe(200);
    expect(page.headers.get("content-type")).toBe("text/html; charset=utf-8");
    expect(page.headers.get("cache-control")).toBe("no-store");
    expect(page.headers.get("content-security-policy")).toContain("default-src 'none'");
    expect(page.body).toContain('data-chart="shares"');
    expect(page.body).toContain('data-chart="attention-map"');
    expect(page.body).toContain("Ana Arbor");
    for (const hidden of ["UBO", "Bo Birch", "UCY", "Cy Cedar", "UDEE", "UELI", "UFAY", "~"]) {
      expect(page.body).not.toContain(hidden);
    }
  });

  it("shows a member who is no facilitator only themself, with names off", async () => {
    const page = await get(server.route.linkFor(CHANNEL, "UCY"));
    expect(page.status).toBe(200);
    expect(page.body).toContain("you (Cy Cedar)");
    for (const hidden of ["Ana Arbor", "UANA", "Bo Birch", "UBO"])
      expect(page.body).not.toContain(hidden);
  });

  it("refuses a forged link with 403", async () => {
    const forged = signReportToken({
      channel: CHANNEL,
      reader: "UBOSS",
      now: server.clock.now(),
      secret: "another-secret-0123456789",
    });
    const page = await get(`/reports/${forged}`);
    expect(page.status).toBe(403);
    expect(page.body).toContain("has expired or is not valid");
    expect(page.body).not.toContain("data-chart");
    expect((await get("/reports/not-a-token")).status).toBe(403);
    expect((await get("/reports/")).status).toBe(403);
  });

  it("refuses a tampered link with 403", async () => {
    const [, signature] = server.route.linkFor(CHANNEL, "UCY").slice("/reports/".length).split(".");
    const payload = Buffer.from(
      JSON.stringify({ c: CHANNEL, r: "UBOSS", e: server.clock.now() + 1e9 }),
    ).toString("base64url");
    expect((await get(`/reports/${payload}.${signature}`)).status).toBe(403);
  });

  it("refuses a link 24 hours after it was made", async () => {
    const link = server.route.linkFor(CHANNEL, "UBOSS");
    const start = server.clock.now();
    server.clock.set(start + 24 * 3_600_000 - 1);
    expect((await get(link)).status).toBe(200);
    server.clock.set(start + 24 * 3_600_000);
    expect((await get(link)).status).toBe(403);
    server.clock.set(start);
  });

  it("answers other methods with 405", async () => {
    const link = server.route.linkFor(CHANNEL, "UBOSS");
    const page = await get(link, { method: "POST", body: "x" });
    expect(page.status).toBe(405);
  });
});
