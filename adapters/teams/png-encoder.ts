/**
 * @module png-encoder
 * Writes an 8-bit RGBA PNG (W3C 2003, "Portable Network Graphics (PNG) Specification, Second
 * Edition": signature, IHDR with colour type 6, one zlib-compressed IDAT of filter-0 scanlines,
 * IEND; each chunk closed by the CRC-32 of its type and data). Used to draw the Teams app icons.
 */
import { deflateSync } from "node:zlib";
import { crc32 } from "./crc32.js";

const SIGNATURE = Buffer.from([0x89, 0x50, 0x4e, 0x47, 0x0d, 0x0a, 0x1a, 0x0a]);

function chunk(type: string, data: Buffer): Buffer {
  const head = Buffer.alloc(8);
  head.writeUInt32BE(data.length, 0);
  head.write(type, 4, "ascii");
  const crc = Buffer.alloc(4);
  crc.writeUInt32BE(crc32(Buffer.concat([head.subarray(4), data])), 0);
  return Buffer.concat([head, data, crc]);
}

/** PNG bytes of a `width`×`height` image; `rgba` holds 4 bytes per pixel, row by row. */
export function encodePng(image: { width: number; height: number; rgba: Uint8Array }): Buffer {
  const { width, height, rgba } = image;
  if (rgba.length !== width * height * 4)
    throw new Error("rgba must hold width × height × 4 bytes");
  const ihdr = Buffer.alloc(13);
  ihdr.writeUInt32BE(width, 0);
  ihdr.writeUInt32BE(height, 4);
  ihdr[8] = 8; // bit depth
  ihdr[9] = 6; // colour type: truecolour with alpha
  const raw = Buffer.alloc(height * (1 + width * 4));
  for (let y = 0; y < height; y++) {
    raw[y * (1 + width * 4)] = 0; // filter type None
    Buffer.from(rgba.buffer, rgba.byteOffset + y * width * 4, width * 4).copy(
      raw,
      y * (1 + width * 4) + 1,
    );
  }
  return Buffer.concat([
    SIGNATURE,
    chunk("IHDR", ihdr),
    chunk("IDAT", deflateSync(raw, { level: 9 })),
    chunk("IEND", Buffer.alloc(0)),
  ]);
}
