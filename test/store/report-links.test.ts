/**
 * Report links across replicas and roles (issue 11, finding 11). Without PLUMBLINE_REPORT_SECRET
 * the signing secret lives in the store, so a link made by one `serve` works on another process
 * of the same database (here: a restart, the same code path a second replica takes); with the
 * setting, the setting wins. The facilitator role is read on every view, so a facilitator removed
 * after the link was made sees the member view on the next visit.
 */
import { mkdtempSync, rmSync } from "node:fs";
import { createServer } from "node:http";
import type { AddressInfo } from "node:net";
import { tmpdir } from "node:os";
import { join } from "node:path";
import { afterAll, describe, expect, it } from "vitest";
import { createReportRoute } from "../../adapters/report-route.js";
import { REPORT_SECRET_NAME, serve } from "../../adapters/serve.js";
import { ManualClock } from "../../src/ports/clock.js";
import { MemoryLogger } from "../../src/ports/logger.js";
import { signReportToken } from "../../src/report/report-token.js";
import { openStore } from "../../src/store/open-store.js";
import {
  busyChannel,
  CHANNEL,
  DAY,
  HOUR,
  mentions,
  NAMES,
  NOW,
  runner,
  T0,
} from "../commands/channel-fixture.js";
import { TEST_KEY } from "./test-key.js";

const dir = mkdtempSync(join(tmpdir(), "plumbline-links-"));
afterAll(() => rmSync(dir, { recursive: true, force: true }));

describe("report links", () => {
  it("a facilitator removed after the link was made loses the facilitator view on the next view", async () => {
    const channel = await busyChannel();
    const route = createReportRoute({
      store: channel.store,
      secret: "invented-route-secret-0123456789",
      clock: new ManualClock(NOW),
      facilitators: ["UBOSS"],
      displayName: async (id) => NAMES[id] ?? null,
    });
    const server = createServer((request, response) => void route.handle(request, response));
    await new Promise<void>((resolve) => server.listen(0, "127.0.0.1", resolve));
    const base = `http://127.0.0.1:${(server.address() as AddressInfo).port}`;
    try {
      // k = 3, so the 4 counted members UCY does not know may be shown beside Ana (DESIGN.md §7).
      await channel.run("UBOSS", "set minmembers 3");
      await channel.store.addFacilitator(CHANNEL, "UCY");
      const link = route.linkFor(CHANNEL, "UCY");
      const asFacilitator = await (await fetch(`${base}${link}`)).text();
      expect(asFacilitator).toContain("Ana Arbor"); // named figures: the facilitator view
      await channel.store.removeFacilitator(CHANNEL, "UCY");
      const asMember = await (await fetch(`${base}${link}`)).text();
      expect(asMember).not.toContain("Ana Arbor");
      expect(asMember).toContain("you (Cy Cedar)");
    } finally {
      await new Promise<void>((resolve) => server.close(() => resolve()));
      await channel.store.close();
    }
  });

  it("a link made by one serve process works on the next one without PLUMBLINE_REPORT_SECRET", async () => {
    const db = join(dir, "links.db");
    const seed = await openStore(`sqlite:${db}`, { idKey: TEST_KEY });
    const r = await runner({ store: seed });
    await r.run("UANA", "join named", { now: T0 });
    for (const m of ["UBO", "UCY", "UDEE", "UELI", "UFAY"]) await r.run(m, "join", { now: T0 });
    let k = 0;
    for (const [from, to] of [
      ["UBO", "UANA"],
      ["UCY", "UANA"],
      ["UDEE", "UBO"],
      ["UELI", "UCY"],
      ["UFAY", "UDEE"],
      ["UANA", "UELI"],
    ]) {
      await mentions(seed, { from, to, times: 5, at: T0 + DAY + k++ * HOUR });
    }
    await seed.close();
    const env = {
      DATABASE_URL: `sqlite:${db}`,
      PLUMBLINE_ID_KEY: TEST_KEY,
      HOST: "127.0.0.1",
      PORT: "0",
      PLUMBLINE_TEAMS_DEV_NO_AUTH: "1",
    };
    const clock = new ManualClock(NOW);
    const options = { clock, logger: new MemoryLogger(), schedule: false, cwd: dir };
    const first = await serve({ env, ...options });
    const secret = await first.store.sharedSecret(REPORT_SECRET_NAME);
    await first.close();
    const token = signReportToken({ channel: CHANNEL, reader: "UANA", now: NOW, secret });
    const second = await serve({ env, ...options });
    try {
      const page = await fetch(`http://127.0.0.1:${second.port}/reports/${token}`);
      expect(page.status).toBe(200);
      expect(await page.text()).toContain('data-chart="shares"');
    } finally {
      await second.close();
    }
    // A configured secret takes precedence: the stored one no longer signs valid links.
    const third = await serve({
      env: { ...env, PLUMBLINE_REPORT_SECRET: "configured-secret-0123456789abcdef" },
      ...options,
    });
    try {
      expect((await fetch(`http://127.0.0.1:${third.port}/reports/${token}`)).status).toBe(403);
    } finally {
      await third.close();
    }
  });
});
