/**
 * @module png-encoder
 * Writes an 8-bit RGBA PNG (W3C 2003, "Portable Network Graphics (PNG) Specification, Second
 * Edition": signature, IHDR with colour type 6, one zlib-compressed IDAT of filter-0 scanlines,
 * IEND; each chunk closed by the CRC-32 of its type and data), or, for images of at most 256
 * colours, an indexed one (colour type 3 with a PLTE chunk, and tRNS when a colour is not opaque;
 * §11.2.3, §11.3.2.1), which keeps a flat chart small enough for a Teams card. Used to draw the
 * Teams app icons and the digest's chart image.
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

/**
 * Indexed-colour PNG bytes (8-bit indices) of an RGBA image, or null when it has more than 256
 * distinct colours. Scanlines use filter None, as the specification advises for palette images
 * (§12.8).
 */
export function encodeIndexedPng(image: {
  width: number;
  height: number;
  rgba: Uint8Array;
}): Buffer | null {
  const { width, height, rgba } = image;
  if (rgba.length !== width * height * 4)
    throw new Error("rgba must hold width × height × 4 bytes");
  const pixels = Buffer.from(rgba.buffer, rgba.byteOffset, rgba.length);
  const index = new Map<number, number>();
  const raw = Buffer.alloc(height * (1 + width));
  for (let y = 0; y < height; y++) {
    for (let x = 0; x < width; x++) {
      const colour = pixels.readUInt32BE((y * width + x) * 4);
      let k = index.get(colour);
      if (k === undefined) {
        if (index.size === 256) return null;
        k = index.size;
        index.set(colour, k);
      }
      raw[y * (1 + width) + 1 + x] = k;
    }
  }
  const colours = [...index.keys()];
  const plte = Buffer.alloc(colours.length * 3);
  const alpha = Buffer.alloc(colours.length);
  colours.forEach((c, k) => {
    plte[k * 3] = c >>> 24;
    plte[k * 3 + 1] = (c >>> 16) & 0xff;
    plte[k * 3 + 2] = (c >>> 8) & 0xff;
    alpha[k] = c & 0xff;
  });
  const ihdr = Buffer.alloc(13);
  ihdr.writeUInt32BE(width, 0);
  ihdr.writeUInt32BE(height, 4);
  ihdr[8] = 8; // bit depth
  ihdr[9] = 3; // colour type: indexed
  const opaque = alpha.every((a) => a === 0xff);
  return Buffer.concat([
    SIGNATURE,
    chunk("IHDR", ihdr),
    chunk("PLTE", plte),
    ...(opaque ? [] : [chunk("tRNS", alpha)]),
    chunk("IDAT", deflateSync(raw, { level: 9 })),
    chunk("IEND", Buffer.alloc(0)),
  ]);
}
