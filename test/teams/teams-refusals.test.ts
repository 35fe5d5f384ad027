/**
 * Refused Teams requests: a well-formed but unverifiable token (its signing keys cannot be
 * fetched, as on a machine with no network) is answered 401 with an empty body, never 500 with
 * the SDK's fetch error; the SDK's console output is routed into the JSON logger, one line per
 * refusal, rate-limited. The 401 follows the Bot Framework's authentication rules
 * (learn.microsoft.com/azure/bot-service/rest-api/bot-framework-rest-connector-authentication:
 * "the bot must reject the request with HTTP 401" when the token cannot be validated).
 */
import nock from "nock";
import { afterEach, beforeEach, describe, expect, it, vi } from "vitest";
import { fixture, type Harness, startHarness } from "./harness.js";

const CONFIG = {
  appId: "00000000-0000-4000-8000-000000000001",
  appPassword: "invented-password",
  appType: "SingleTenant" as const,
  tenantId: "00000000-0000-4000-8000-0000000000aa",
};

const b64 = (value: unknown) => Buffer.from(JSON.stringify(value)).toString("base64url");

/** A token shaped like the Bot Framework's (RS256, issuer, audience), with an invented signature. */
function jwtShapedToken(serviceUrl: string): string {
  const header = { alg: "RS256", kid: "invented-key-id", typ: "JWT", x5t: "invented-key-id" };
  const payload = {
    iss: "https://api.botframework.com",
    aud: CONFIG.appId,
    serviceurl: serviceUrl,
    nbf: 1_700_000_000,
    exp: 4_100_000_000,
  };
  return `${b64(header)}.${b64(payload)}.${Buffer.from("not-a-signature").toString("base64url")}`;
}

describe("Teams refusals", () => {
  let h: Harness;
  const consoleCalls: unknown[][] = [];
  beforeEach(async () => {
    consoleCalls.length = 0;
    for (const method of ["error", "warn", "log", "info", "debug"] as const) {
      vi.spyOn(console, method).mockImplementation((...args: unknown[]) => {
        consoleCalls.push(args);
      });
    }
    nock.disableNetConnect();
    nock.enableNetConnect("127.0.0.1");
    h = await startHarness({ config: CONFIG, devNoAuth: false });
  });
  afterEach(async () => {
    await h.close();
    nock.cleanAll();
    nock.enableNetConnect();
    vi.restoreAllMocks();
  });

  it("answers 401 with no detail to a JWT-shaped token whose keys cannot be fetched", async () => {
    const activity = fixture("channel-message.json");
    const token = jwtShapedToken(String(activity.serviceUrl));
    const reply = await h.post(activity, { authorization: `Bearer ${token}` });
    expect(reply.status).toBe(401);
    expect(reply.text).toBe("");
    expect(await h.store.listChannels()).toEqual([]);
    expect(consoleCalls).toEqual([]);
    const refusals = h.logger.records.filter((r) => r.message === "teams request refused");
    expect(refusals).toHaveLength(1);
    expect(refusals[0].fields).toMatchObject({ status: 401 });
  });

  it("writes at most one JSON line per refusal, rate-limited, for 1,000 refusals", async () => {
    const activity = fixture("channel-message.json");
    const token = jwtShapedToken(String(activity.serviceUrl));
    const statuses = new Map<number, number>();
    for (let batch = 0; batch < 1000; batch += 50) {
      const replies = await Promise.all(
        Array.from({ length: 50 }, (_, i) =>
          h.post(activity, (batch + i) % 2 === 0 ? { authorization: `Bearer ${token}` } : {}),
        ),
      );
      for (const { status } of replies) statuses.set(status, (statuses.get(status) ?? 0) + 1);
    }
    expect([...statuses]).toEqual([[401, 1000]]);
    expect(consoleCalls).toEqual([]);
    const lines = h.logger.records.map((r) => JSON.stringify({ ...r.fields, msg: r.message }));
    // Started with one info line; 10 refusal lines per minute, the rest counted.
    expect(lines.length).toBeLessThanOrEqual(12);
    expect(lines.every((line) => !line.includes("\\n    at "))).toBe(true);
    const bytes = lines.reduce((sum, line) => sum + line.length + 1, 0);
    expect(bytes).toBeLessThan(4_000);
    h.clock.advance(61_000);
    expect((await h.post(activity)).status).toBe(401);
    const last = h.logger.records.at(-1);
    expect(last?.message).toBe("teams request refused");
    expect(last?.fields).toMatchObject({ suppressed: 990 });
  });
});
