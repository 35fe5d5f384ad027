/**
 * @module app-icons
 * Draws plumbline's own Teams app icons: a plumb bob hanging on its string above a short level
 * line. The colour icon is 192×192, a light mark on a deep green-grey square; the outline icon is
 * 32×32, the white mark on transparency (the two sizes Teams asks for: learn.microsoft.com/
 * microsoftteams/platform/concepts/build-and-test/apps-package). Edges are smoothed by 4×4
 * supersampling. Run `npx tsx adapters/teams/app-icons.ts` to rewrite manifest/teams/*.png.
 */
import { writeFileSync } from "node:fs";
import { join } from "node:path";
import { encodePng } from "./png-encoder.js";

type Rgb = readonly [number, number, number];

const BACKGROUND: Rgb = [0x2b, 0x47, 0x45];
const MARK: Rgb = [0xf2, 0xee, 0xe4];
const WHITE: Rgb = [0xff, 0xff, 0xff];

/** True when the unit-square point (x, y), y downwards, lies on the mark. */
export function onMark(x: number, y: number): boolean {
  const cx = 0.5;
  const string = Math.abs(x - cx) <= 0.022 && y >= 0.1 && y <= 0.3;
  const cap = Math.abs(x - cx) <= 0.06 && y >= 0.28 && y <= 0.34;
  // Body: an upper half-ellipse from y 0.34 to 0.52, then a cone narrowing to the tip at 0.84.
  let half = 0;
  if (y >= 0.34 && y <= 0.52) half = 0.2 * Math.sqrt(Math.max(0, 1 - ((0.52 - y) / 0.18) ** 2));
  else if (y > 0.52 && y <= 0.84) half = 0.2 * (1 - (y - 0.52) / 0.32);
  const body = Math.abs(x - cx) <= half;
  const level = y >= 0.88 && y <= 0.92 && x >= 0.22 && x <= 0.78;
  return string || cap || body || level;
}

/** RGBA pixels of the mark: `background` null leaves it transparent. */
export function drawIcon(size: number, mark: Rgb, background: Rgb | null): Uint8Array {
  const rgba = new Uint8Array(size * size * 4);
  const samples = 4;
  for (let py = 0; py < size; py++) {
    for (let px = 0; px < size; px++) {
      let hits = 0;
      for (let sy = 0; sy < samples; sy++) {
        for (let sx = 0; sx < samples; sx++) {
          if (onMark((px + (sx + 0.5) / samples) / size, (py + (sy + 0.5) / samples) / size))
            hits++;
        }
      }
      const cover = hits / (samples * samples);
      const at = (py * size + px) * 4;
      if (background === null) {
        rgba.set([mark[0], mark[1], mark[2], Math.round(cover * 255)], at);
      } else {
        const mix = (k: number) => Math.round(background[k] * (1 - cover) + mark[k] * cover);
        rgba.set([mix(0), mix(1), mix(2), 255], at);
      }
    }
  }
  return rgba;
}

/** The two icon files' bytes. */
export function appIcons(): { color: Buffer; outline: Buffer } {
  return {
    color: encodePng({ width: 192, height: 192, rgba: drawIcon(192, MARK, BACKGROUND) }),
    outline: encodePng({ width: 32, height: 32, rgba: drawIcon(32, WHITE, null) }),
  };
}

if (process.argv[1]?.endsWith("app-icons.ts")) {
  const dir = join(import.meta.dirname, "../../manifest/teams");
  const { color, outline } = appIcons();
  writeFileSync(join(dir, "color.png"), color);
  writeFileSync(join(dir, "outline.png"), outline);
  process.stdout.write(`wrote ${join(dir, "color.png")} and ${join(dir, "outline.png")}\n`);
}
