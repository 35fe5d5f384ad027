import { describe, expect, it } from "vitest";
import { ConfigError, loadConfig } from "../../src/config/load-config.js";

// The Teams settings as `plumbline serve` reads them (issue 6): an incomplete set names each gap.
describe("Teams settings", () => {
  it("an app id alone is refused, naming the password and the tenant", () => {
    const failure = (() => {
      try {
        loadConfig({ MICROSOFT_APP_ID: "00000000-0000-4000-8000-000000000001" });
      } catch (error) {
        return error;
      }
      return null;
    })();
    expect(failure).toBeInstanceOf(ConfigError);
    const settings = (failure as ConfigError).problems.map((p) => p.setting).sort();
    expect(settings).toEqual(["MICROSOFT_APP_PASSWORD", "MICROSOFT_APP_TENANT_ID"]);
  });

  it("a complete set defaults to SingleTenant; the dev flag alone gives no Teams section", () => {
    const config = loadConfig({
      MICROSOFT_APP_ID: "00000000-0000-4000-8000-000000000001",
      MICROSOFT_APP_PASSWORD: "invented",
      MICROSOFT_APP_TENANT_ID: "00000000-0000-4000-8000-0000000000aa",
    });
    expect(config.teams?.appType).toBe("SingleTenant");
    const dev = loadConfig({ PLUMBLINE_TEAMS_DEV_NO_AUTH: "1" });
    expect(dev.teams).toBeNull();
    expect(dev.teamsDevNoAuth).toBe(true);
  });
});
