import nock from "nock";
import { afterEach, beforeEach, describe, expect, it } from "vitest";
import { createTeamsAdapter } from "../../adapters/teams/teams-adapter.js";
import { isPlumblineError } from "../../src/domain/errors.js";
import { MemoryLogger } from "../../src/ports/logger.js";
import { fixture, type Harness, startHarness } from "./harness.js";

// Invented credentials: the requests below fail on the token before any key fetch, so no network.
const CONFIG = {
  appId: "00000000-0000-4000-8000-000000000001",
  appPassword: "invented-password",
  appType: "SingleTenant" as const,
  tenantId: "00000000-0000-4000-8000-0000000000aa",
};

describe("Teams authentication", () => {
  let h: Harness;
  beforeEach(async () => {
    nock.disableNetConnect();
    nock.enableNetConnect("127.0.0.1");
    h = await startHarness({ config: CONFIG, devNoAuth: false });
  });
  afterEach(async () => {
    await h.close();
    nock.cleanAll();
    nock.enableNetConnect();
  });

  it("answers 401 to a request without a token and to a garbage token, storing nothing", async () => {
    expect((await h.post(fixture("conversation-update-add.json"))).status).toBe(401);
    const garbage = await h.post(fixture("channel-message.json"), {
      authorization: "Bearer not-a-jwt",
    });
    expect(garbage.status).toBe(401);
    expect(await h.store.listChannels()).toEqual([]);
    expect(h.logger.records.some((r) => /AUTHENTICATION IS OFF/.test(r.message))).toBe(false);
  });
});

describe("createTeamsAdapter without credentials", () => {
  it("refuses to start unless the development flag is set", async () => {
    const logger = new MemoryLogger();
    const failure = await createTeamsAdapter({ config: null, devNoAuth: false, logger }).catch(
      (e: unknown) => e,
    );
    expect(isPlumblineError(failure) && failure.code).toBe("CONFIG_INVALID");
    expect(isPlumblineError(failure) && failure.hint).toContain("MICROSOFT_APP_ID");
  });

  it("announces the development flag with a warning", async () => {
    const logger = new MemoryLogger();
    const adapter = await createTeamsAdapter({ config: null, devNoAuth: true, logger });
    expect(adapter.channelPrefix).toBe("teams:");
    expect(adapter.routes.map((r) => r.path)).toEqual(["/api/messages"]);
    const warning = logger.records.find((r) => r.level === "warn");
    expect(warning?.message).toMatch(/TEAMS AUTHENTICATION IS OFF/);
  });
});
