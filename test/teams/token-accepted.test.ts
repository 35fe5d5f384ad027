/**
 * Teams authentication with a token that should pass, and near misses that must not. The Bot
 * Framework's channel tokens are RS256 JWTs (RFC 7519, RFC 7515) issued by
 * `https://api.botframework.com`, audience = the bot's app id, signed by a key published through
 * OpenID Connect discovery (OpenID Connect Discovery 1.0; keys as a JWK set, RFC 7517) at
 * login.botframework.com; the SDK also checks the `serviceurl` claim against the activity and the
 * key's endorsements against the channel id (Microsoft, "Authentication with the Bot Connector
 * API", Bot Framework documentation, "Connector to bot" steps). nock serves the metadata and a key
 * set holding a locally generated RSA key; the SDK's own validator does the rest.
 */
import { generateKeyPairSync, type KeyObject, sign } from "node:crypto";
import nock from "nock";
import { afterEach, beforeEach, describe, expect, it } from "vitest";
import { fixture, type Harness, startHarness } from "./harness.js";

const APP_ID = "00000000-0000-4000-8000-000000000001";
const CONFIG = {
  appId: APP_ID,
  appPassword: "invented-password",
  appType: "SingleTenant" as const,
  tenantId: "00000000-0000-4000-8000-0000000000aa",
};
const ISSUER = "https://api.botframework.com";
const LOGIN = "https://login.botframework.com";
const KID = "plumbline-test-key";
const SERVICE_URL = "https://smba.test.example/amer/";

const trusted = generateKeyPairSync("rsa", { modulusLength: 2048 });
const stranger = generateKeyPairSync("rsa", { modulusLength: 2048 });

function b64url(value: Buffer | string): string {
  return Buffer.from(value).toString("base64url");
}

function token(
  claims: Record<string, unknown>,
  options: { key?: KeyObject; kid?: string } = {},
): string {
  const head = b64url(JSON.stringify({ alg: "RS256", typ: "JWT", kid: options.kid ?? KID }));
  const body = b64url(JSON.stringify(claims));
  const signature = sign(
    "RSA-SHA256",
    Buffer.from(`${head}.${body}`),
    options.key ?? trusted.privateKey,
  );
  return `${head}.${body}.${b64url(signature)}`;
}

/** Claims a real channel token carries, valid for the next hour (jsonwebtoken reads the real clock). */
function goodClaims(overrides: Record<string, unknown> = {}): Record<string, unknown> {
  const now = Math.floor(Date.now() / 1000);
  return {
    iss: ISSUER,
    aud: APP_ID,
    serviceurl: SERVICE_URL,
    nbf: now - 60,
    iat: now - 60,
    exp: now + 3600,
    ...overrides,
  };
}

function publishKeys(): void {
  const jwk = trusted.publicKey.export({ format: "jwk" });
  nock(LOGIN)
    .persist()
    .get("/v1/.well-known/openidconfiguration")
    .reply(200, {
      issuer: ISSUER,
      authorization_endpoint: `${LOGIN}/v1/auth`,
      jwks_uri: `${LOGIN}/v1/.well-known/keys`,
      id_token_signing_alg_values_supported: ["RS256"],
      token_endpoint_auth_methods_supported: ["private_key_jwt"],
    })
    .get("/v1/.well-known/keys")
    .reply(200, {
      keys: [{ kty: "RSA", use: "sig", kid: KID, n: jwk.n, e: jwk.e, endorsements: ["msteams"] }],
    });
}

describe("Teams token validation against published keys", () => {
  let h: Harness;
  beforeEach(async () => {
    nock.disableNetConnect();
    nock.enableNetConnect("127.0.0.1");
    publishKeys();
    h = await startHarness({ config: CONFIG, devNoAuth: false });
  });
  afterEach(async () => {
    await h.close();
    nock.cleanAll();
    nock.enableNetConnect();
  });

  const message = () => fixture("channel-message.json");
  const bearer = (jwt: string) => ({ authorization: `Bearer ${jwt}` });

  it("accepts a token with the right issuer, audience, service URL and key", async () => {
    const response = await h.post(message(), bearer(token(goodClaims())));
    expect(response.status).toBe(200);
  });

  it("refuses a token for another app (wrong audience)", async () => {
    const other = goodClaims({ aud: "00000000-0000-4000-8000-0000000000ff" });
    expect((await h.post(message(), bearer(token(other)))).status).toBe(401);
  });

  it("refuses a token from another issuer", async () => {
    const other = goodClaims({ iss: "https://sts.example.invalid" });
    expect((await h.post(message(), bearer(token(other)))).status).toBe(401);
  });

  it("refuses an expired token (past the SDK's five-minute clock tolerance)", async () => {
    const now = Math.floor(Date.now() / 1000);
    const expired = goodClaims({ nbf: now - 7200, iat: now - 7200, exp: now - 3600 });
    expect((await h.post(message(), bearer(token(expired)))).status).toBe(401);
  });

  it("refuses a token signed by a key the metadata does not publish", async () => {
    const forged = token(goodClaims(), { key: stranger.privateKey });
    expect((await h.post(message(), bearer(forged))).status).toBe(401);
  });

  it("refuses a token whose service URL differs from the activity's", async () => {
    const other = goodClaims({ serviceurl: "https://smba.elsewhere.example/emea/" });
    expect((await h.post(message(), bearer(token(other)))).status).toBe(401);
  });
});
