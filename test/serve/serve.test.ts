/**
 * The composition root as an operator meets it: refuses to start without a platform or with an
 * incomplete one (naming each setting), and serves /healthz and the Teams route on one server.
 */
import { mkdtempSync, rmSync } from "node:fs";
import { tmpdir } from "node:os";
import { join } from "node:path";
import { afterEach, describe, expect, it } from "vitest";
import { type RunningServer, serve } from "../../adapters/serve.js";
import { MemoryLogger } from "../../src/ports/logger.js";

let running: RunningServer | null = null;
let dir: string | null = null;

afterEach(async () => {
  await running?.close();
  running = null;
  if (dir) rmSync(dir, { recursive: true, force: true });
  dir = null;
});

describe("plumbline serve", () => {
  it("refuses to start without any chat platform, naming the settings", async () => {
    await expect(serve({ env: {}, schedule: false })).rejects.toMatchObject({
      code: "CONFIG_INVALID",
      hint: expect.stringContaining("SLACK_SIGNING_SECRET"),
    });
  });

  it("refuses an incomplete Teams set, naming each missing setting", async () => {
    await expect(
      serve({ env: { MICROSOFT_APP_ID: "app" }, schedule: false }),
    ).rejects.toMatchObject({
      code: "CONFIG_INVALID",
      message: expect.stringMatching(/MICROSOFT_APP_PASSWORD[\s\S]*MICROSOFT_APP_TENANT_ID/),
    });
  });

  it("serves /healthz and the Teams route on one HTTP server; a bad body gets 400", async () => {
    dir = mkdtempSync(join(tmpdir(), "plumbline-serve-"));
    const logger = new MemoryLogger();
    running = await serve({
      env: {
        DATABASE_URL: `sqlite:${join(dir, "bot.db")}`,
        HOST: "127.0.0.1",
        PORT: "0",
        PLUMBLINE_TEAMS_DEV_NO_AUTH: "1",
      },
      logger,
      schedule: false,
    });
    const base = `http://127.0.0.1:${running.port}`;
    const health = await fetch(`${base}/healthz`);
    expect(health.status).toBe(200);
    expect(await health.json()).toMatchObject({ ok: true, store: "sqlite", platforms: ["teams"] });
    const bad = await fetch(`${base}/api/messages`, {
      method: "POST",
      body: "{}",
      headers: { "content-type": "application/json" },
    });
    expect(bad.status).toBe(400);
    expect((await fetch(`${base}/nowhere`)).status).toBe(404);
    expect((await fetch(`${base}/healthz`)).status).toBe(200);
    // Running without Teams credentials is announced loudly.
    expect(logger.records.some((r) => r.level === "warn")).toBe(true);
  });

  it("serves signed report pages: a facilitator's link opens, a forged one gets 403", async () => {
    dir = mkdtempSync(join(tmpdir(), "plumbline-serve-"));
    running = await serve({
      env: {
        DATABASE_URL: `sqlite:${join(dir, "bot.db")}`,
        HOST: "127.0.0.1",
        PORT: "0",
        PLUMBLINE_TEAMS_DEV_NO_AUTH: "1",
        PLUMBLINE_FACILITATORS: "ana",
        PLUMBLINE_REPORT_SECRET: "a-report-secret-of-some-length",
      },
      logger: new MemoryLogger(),
      schedule: false,
    });
    const base = `http://127.0.0.1:${running.port}`;
    const ask = (member: string) =>
      running?.bot.onCommand({
        channel: "teams:c1",
        member,
        text: "report",
        isPlatformAdmin: false,
      });
    const refused = await ask("bo");
    expect(refused?.message.text).toMatch(/Only this channel's facilitators/);
    const answer = await ask("ana");
    expect(answer?.visibility).toBe("private");
    const link = /\/reports\/\S+/.exec(answer?.message.text ?? "")?.[0] ?? "";
    expect(link).not.toBe("");
    const page = await fetch(`${base}${link}`);
    expect(page.status).toBe(200);
    expect(page.headers.get("content-type")).toContain("text/html");
    expect((await fetch(`${base}/reports/not-a-token`)).status).toBe(403);
    expect((await fetch(`${base}${link}x`)).status).toBe(403);
  });
});
