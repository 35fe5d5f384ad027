import { execFileSync, spawnSync } from "node:child_process";
import { mkdtempSync, readFileSync, writeFileSync } from "node:fs";
import { tmpdir } from "node:os";
import { join } from "node:path";
import { describe, expect, it } from "vitest";
import { appIcons } from "../../adapters/teams/app-icons.js";
import { crc32 } from "../../adapters/teams/crc32.js";
import { fillManifest, packageApp } from "../../adapters/teams/package-app.js";
import { writeZip } from "../../adapters/teams/zip-writer.js";

const MANIFEST_DIR = join(import.meta.dirname, "../../manifest/teams");
const APP_ID = "12345678-1234-4234-8234-123456789abc";
const hasUnzip = spawnSync("unzip", ["-v"]).status === 0;
const hasPython = spawnSync("python3", ["--version"]).status === 0;

describe("CRC-32", () => {
  it('gives the published check value for "123456789"', () => {
    // Check value 0xCBF43926 (common practice; the CRC-32/ISO-HDLC entry of the CRC catalogue).
    expect(crc32(Buffer.from("123456789"))).toBe(0xcbf43926);
    expect(crc32(Buffer.alloc(0))).toBe(0);
    expect(crc32(Buffer.from("56789"), crc32(Buffer.from("1234")))).toBe(0xcbf43926);
  });
});

describe.runIf(hasUnzip)("zip writer, read back by Info-ZIP unzip", () => {
  it("lists, tests and extracts every entry byte for byte", () => {
    const dir = mkdtempSync(join(tmpdir(), "plumbline-zip-"));
    const entries = [
      { name: "a.txt", data: Buffer.from("hello hello hello hello\n") },
      {
        name: "dir/b.bin",
        data: Buffer.from(Array.from({ length: 5000 }, (_, i) => (i * 7) % 256)),
      },
      { name: "empty", data: Buffer.alloc(0) },
    ];
    const file = join(dir, "t.zip");
    writeFileSync(file, writeZip(entries));
    const listing = execFileSync("unzip", ["-l", file], { encoding: "utf8" });
    for (const e of entries) expect(listing).toContain(e.name);
    expect(execFileSync("unzip", ["-t", file], { encoding: "utf8" })).toContain(
      "No errors detected",
    );
    for (const e of entries) {
      expect(Buffer.compare(execFileSync("unzip", ["-p", file, e.name]), e.data)).toBe(0);
    }
  });
});

describe("Teams app package", () => {
  it("fills the app id into id, botId and webApplicationInfo", () => {
    const manifest = JSON.parse(
      fillManifest(readFileSync(join(MANIFEST_DIR, "manifest.json"), "utf8"), APP_ID),
    );
    expect(manifest.id).toBe(APP_ID);
    expect(manifest.bots[0].botId).toBe(APP_ID);
    expect(manifest.webApplicationInfo.id).toBe(APP_ID);
    expect(manifest.manifestVersion).toBe("1.30");
    expect(manifest.$schema).toBe(
      "https://developer.microsoft.com/en-us/json-schemas/teams/v1.30/MicrosoftTeams.schema.json",
    );
    expect(manifest.bots[0].scopes).toEqual(expect.arrayContaining(["team", "groupChat"]));
    expect(manifest.authorization.permissions.resourceSpecific).toEqual(
      expect.arrayContaining([
        { name: "ChannelMessage.Read.Group", type: "Application" },
        { name: "ChatMessage.Read.Chat", type: "Application" },
      ]),
    );
    const commands = manifest.bots[0].commandLists.flatMap(
      (l: { commands: unknown[] }) => l.commands,
    );
    expect(commands.length).toBeLessThanOrEqual(12);
    for (const c of commands) expect((c as { title: string }).title).toMatch(/^influence /);
  });

  it("refuses a missing or malformed app id", () => {
    expect(() => fillManifest("{}", undefined)).toThrow(/MICROSOFT_APP_ID/);
    expect(() => fillManifest("{}", "not-a-guid")).toThrow(/MICROSOFT_APP_ID/);
  });

  it.runIf(hasUnzip)("zips the manifest and both icons at the root", () => {
    const dir = mkdtempSync(join(tmpdir(), "plumbline-app-"));
    const file = join(dir, "app.zip");
    writeFileSync(file, packageApp(APP_ID));
    const names = execFileSync("unzip", ["-Z1", file], { encoding: "utf8" }).trim().split("\n");
    expect(names.sort()).toEqual(["color.png", "manifest.json", "outline.png"]);
    const manifest = JSON.parse(
      execFileSync("unzip", ["-p", file, "manifest.json"], { encoding: "utf8" }),
    );
    expect(manifest.id).toBe(APP_ID);
    const color = execFileSync("unzip", ["-p", file, "color.png"]);
    expect(Buffer.compare(color, readFileSync(join(MANIFEST_DIR, "color.png")))).toBe(0);
  });
});

describe("app icons", () => {
  it("the committed icons are exactly what the drawing code makes", () => {
    const { color, outline } = appIcons();
    expect(Buffer.compare(color, readFileSync(join(MANIFEST_DIR, "color.png")))).toBe(0);
    expect(Buffer.compare(outline, readFileSync(join(MANIFEST_DIR, "outline.png")))).toBe(0);
  });

  // Independent decoder: Python's zlib and binascii.crc32 read the chunks back.
  it.runIf(hasPython)(
    "decode as RGBA PNGs of 192×192 (opaque) and 32×32 (white on transparent)",
    () => {
      const script = `
import sys, zlib, struct, binascii, json
out = {}
for path in sys.argv[1:]:
    data = open(path, 'rb').read()
    assert data[:8] == b'\\x89PNG\\r\\n\\x1a\\n'
    pos, idat, ihdr = 8, b'', None
    while pos < len(data):
        n, = struct.unpack('>I', data[pos:pos+4]); kind = data[pos+4:pos+8]; body = data[pos+8:pos+8+n]
        crc, = struct.unpack('>I', data[pos+8+n:pos+12+n])
        assert binascii.crc32(kind + body) & 0xffffffff == crc, kind
        if kind == b'IHDR': ihdr = struct.unpack('>IIBBBBB', body)
        if kind == b'IDAT': idat += body
        pos += 12 + n
    w, h = ihdr[0], ihdr[1]
    raw = zlib.decompress(idat)
    assert len(raw) == h * (1 + 4 * w)
    rows = [raw[y*(1+4*w)+1:(y+1)*(1+4*w)] for y in range(h)]
    px = [rows[y][4*x:4*x+4] for y in range(h) for x in range(w)]
    out[path] = {'w': w, 'h': h, 'depth': ihdr[2], 'type': ihdr[3],
        'alphas': sorted(set(p[3] for p in px))[:3], 'opaque': all(p[3] == 255 for p in px),
        'lit_not_white': sum(1 for p in px if p[3] > 0 and p[:3] != b'\\xff\\xff\\xff'),
        'lit': sum(1 for p in px if p[3] > 0)}
print(json.dumps(out))
`;
      const color = join(MANIFEST_DIR, "color.png");
      const outline = join(MANIFEST_DIR, "outline.png");
      const result = JSON.parse(
        execFileSync("python3", ["-c", script, color, outline], { encoding: "utf8" }),
      );
      expect(result[color]).toMatchObject({ w: 192, h: 192, depth: 8, type: 6, opaque: true });
      expect(result[outline]).toMatchObject({
        w: 32,
        h: 32,
        depth: 8,
        type: 6,
        opaque: false,
        lit_not_white: 0,
      });
      expect(result[outline].alphas[0]).toBe(0);
      expect(result[outline].lit).toBeGreaterThan(50);
    },
  );
});
