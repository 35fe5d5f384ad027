/**
 * The Teams app manifest against Microsoft's published JSON schema for manifest v1.30, as shipped
 * offline in the `@microsoft/app-manifest` package (build/json-schemas/teams/v1.30/
 * MicrosoftTeams.schema.json; the same file Microsoft publishes at
 * developer.microsoft.com/json-schemas/teams/v1.30/MicrosoftTeams.schema.json). The schema is
 * written in JSON Schema draft-04 but uses nothing that differs from the draft ajv implements by
 * default (no boolean exclusiveMinimum/Maximum, no schema `id`), so it is compiled with
 * `validateSchema: false`; its one `format` (uri) is not checked.
 */
import { readFileSync } from "node:fs";
import { createRequire } from "node:module";
import { join } from "node:path";
import { Ajv } from "ajv";
import { describe, expect, it } from "vitest";
import { fillManifest } from "../../adapters/teams/package-app.js";

const SCHEMA = createRequire(import.meta.url).resolve(
  "@microsoft/app-manifest/build/json-schemas/teams/v1.30/MicrosoftTeams.schema.json",
);
const MANIFEST = join(import.meta.dirname, "../../manifest/teams/manifest.json");
const APP_ID = "00000000-0000-4000-8000-000000000001";

function validator() {
  const ajv = new Ajv({
    strict: false,
    validateSchema: false,
    validateFormats: false,
    allErrors: true,
  });
  return ajv.compile(JSON.parse(readFileSync(SCHEMA, "utf8")));
}

function filled(): Record<string, unknown> {
  return JSON.parse(fillManifest(readFileSync(MANIFEST, "utf8"), APP_ID)) as Record<
    string,
    unknown
  >;
}

describe("Teams manifest against Microsoft's v1.30 schema", () => {
  it("validates with no error", () => {
    const validate = validator();
    const ok = validate(filled());
    expect(validate.errors ?? []).toEqual([]);
    expect(ok).toBe(true);
  });

  it("the schema does refuse a broken manifest (the check can fail)", () => {
    const validate = validator();
    const broken = filled();
    (broken.bots as Record<string, unknown>[])[0].scopes = ["everywhere"];
    delete broken.developer;
    expect(validate(broken)).toBe(false);
    const paths = (validate.errors ?? []).map((e) => `${e.instancePath} ${e.message}`);
    expect(paths.some((p) => p.includes("/bots/0/scopes"))).toBe(true);
    expect(paths.some((p) => p.includes("developer"))).toBe(true);
  });
});
