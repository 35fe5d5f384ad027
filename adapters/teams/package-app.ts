/**
 * @module package-app
 * `npm run package:teams`: writes the Teams app package, a zip of manifest/teams/manifest.json
 * (with the app id from MICROSOFT_APP_ID filled into `id`, `bots[0].botId` and
 * `webApplicationInfo.id`) and the two icons at its root (learn.microsoft.com/microsoftteams/
 * platform/concepts/build-and-test/apps-package). Output: `dist/teams/plumbline-teams.zip`, or the
 * path given as the first argument.
 */
import { mkdirSync, readFileSync, writeFileSync } from "node:fs";
import { dirname, join, resolve } from "node:path";
import { PlumblineError } from "../../src/domain/errors.js";
import { writeZip } from "./zip-writer.js";

const MANIFEST_DIR = join(import.meta.dirname, "../../manifest/teams");
const APP_ID = /^[0-9a-f]{8}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{12}$/i;

interface ManifestShape {
  id: string;
  bots: { botId: string }[];
  webApplicationInfo: { id: string };
}

/** The manifest text with `appId` filled in; CONFIG_INVALID unless it is an Entra app id (GUID). */
export function fillManifest(template: string, appId: string | undefined): string {
  if (appId === undefined || !APP_ID.test(appId.trim())) {
    throw new PlumblineError(
      "CONFIG_INVALID",
      "MICROSOFT_APP_ID must be the bot's Entra app id (a GUID)",
      {
        hint: "set MICROSOFT_APP_ID to the Application (client) ID of the Azure Bot registration",
      },
    );
  }
  const manifest = JSON.parse(template) as ManifestShape;
  const id = appId.trim().toLowerCase();
  manifest.id = id;
  for (const bot of manifest.bots) bot.botId = id;
  manifest.webApplicationInfo.id = id;
  return `${JSON.stringify(manifest, null, 2)}\n`;
}

/** The package's bytes for `appId`. */
export function packageApp(appId: string | undefined, dir = MANIFEST_DIR): Buffer {
  const manifest = fillManifest(readFileSync(join(dir, "manifest.json"), "utf8"), appId);
  return writeZip([
    { name: "manifest.json", data: Buffer.from(manifest, "utf8") },
    { name: "color.png", data: readFileSync(join(dir, "color.png")) },
    { name: "outline.png", data: readFileSync(join(dir, "outline.png")) },
  ]);
}

if (process.argv[1]?.endsWith("package-app.ts")) {
  const out = resolve(process.argv[2] ?? "dist/teams/plumbline-teams.zip");
  try {
    const zip = packageApp(process.env.MICROSOFT_APP_ID);
    mkdirSync(dirname(out), { recursive: true });
    writeFileSync(out, zip);
    process.stdout.write(
      `wrote ${out} (${zip.length} bytes): upload it in Teams under Apps > Manage your apps > Upload an app\n`,
    );
  } catch (error) {
    const message =
      error instanceof PlumblineError ? `${error.message}; ${error.hint}` : String(error);
    process.stderr.write(`package:teams: ${message}\n`);
    process.exitCode = 1;
  }
}
