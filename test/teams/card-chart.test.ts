/**
 * The card-sized chart image: an indexed-colour PNG (W3C 2003, "Portable Network Graphics (PNG)
 * Specification (Second Edition)": signature §5.2, IHDR §11.2.2 with colour type 3, PLTE §11.2.3)
 * of the share bars at the chart's own 460 px. Decoded back by resvg (its PNG decoder is an
 * independent implementation), it gives the very pixels it was made from. For a 15-member channel
 * it stays far below the ~28 KB Teams message size this project keeps to (Microsoft Learn, "Format
 * your bot messages", older editions; see adapters/teams/card-chart.ts).
 */
import { Resvg } from "@resvg/resvg-js";
import { describe, expect, it } from "vitest";
import { svgToRgba } from "../../adapters/chart-image.js";
import { adaptiveCard } from "../../adapters/teams/adaptive-card.js";
import { CARD_CHART_WIDTH, cardChartRenderer } from "../../adapters/teams/card-chart.js";
import { encodeIndexedPng } from "../../adapters/teams/png-encoder.js";
import { analyzeSnapshotDetailed } from "../../src/analysis/analyze-snapshot.js";
import { DEFAULT_SETTINGS } from "../../src/domain/settings.js";
import { MemoryLogger } from "../../src/ports/logger.js";
import { digestMessage } from "../../src/report/digest-blocks.js";
import { mentionEvents, snapshotOf } from "../report/log-builders.js";

/** Fifteen counted members, each mentioning the next two round a circle, one of them more. */
function fifteenMemberMessage() {
  const ids = Array.from({ length: 15 }, (_, k) => `member-${String(k).padStart(2, "0")}`);
  const pairs: [string, string, number][] = ids.flatMap((id, k): [string, string, number][] => [
    [id, ids[(k + 1) % 15], 2 + (k % 3)],
    [id, ids[(k + 2) % 15], 1],
  ]);
  pairs.push([ids[5], ids[0], 6], [ids[9], ids[0], 5]);
  const snapshot = snapshotOf(mentionEvents(pairs, { consent: () => "counted" }));
  const { report } = analyzeSnapshotDetailed(snapshot, {
    ...DEFAULT_SETTINGS,
    samples: 200,
    seed: 3,
  });
  return digestMessage({ report, previous: null, policy: { namesOn: false } });
}

function decodeWithResvg(png: Buffer, width: number, height: number): Uint8Array {
  const svg = `<svg xmlns="http://www.w3.org/2000/svg" width="${width}" height="${height}"><image width="${width}" height="${height}" href="data:image/png;base64,${png.toString("base64")}"/></svg>`;
  return new Resvg(svg).render().pixels;
}

describe("the card-sized chart image", () => {
  const message = fifteenMemberMessage();
  const svg = message.chart?.svg ?? "";

  it("the digest of a 15-member channel carries a chart naming nobody", () => {
    expect(message.chart).toBeDefined();
    expect(svg).toContain("<svg");
    expect(svg).not.toContain("member-");
    expect(message.chart?.alt).toMatch(/^Influence shares, largest first, with 90% intervals/);
  });

  it("is an indexed PNG at the chart's own width that decodes back to the rendered pixels", () => {
    const logger = new MemoryLogger();
    const png = cardChartRenderer({ logger })(svg);
    expect(png).not.toBeNull();
    const bytes = png ?? Buffer.alloc(0);
    expect([...bytes.subarray(0, 8)]).toEqual([0x89, 0x50, 0x4e, 0x47, 0x0d, 0x0a, 0x1a, 0x0a]);
    expect(bytes.subarray(12, 16).toString("ascii")).toBe("IHDR");
    expect(bytes.readUInt32BE(16)).toBe(CARD_CHART_WIDTH);
    expect(bytes[24]).toBe(8); // bit depth
    expect(bytes[25]).toBe(3); // colour type: indexed
    expect(bytes.subarray(37, 41).toString("ascii")).toBe("PLTE");
    const source = svgToRgba(svg, { width: CARD_CHART_WIDTH });
    expect(source).not.toBeNull();
    if (source === null) return;
    expect(bytes.readUInt32BE(20)).toBe(source.height);
    const decoded = decodeWithResvg(bytes, source.width, source.height);
    expect(Buffer.from(decoded).equals(Buffer.from(source.rgba))).toBe(true);
    expect(logger.records).toEqual([]);
  });

  it("keeps the whole card, image included, under 28 KB", () => {
    const png = cardChartRenderer({ logger: new MemoryLogger() })(svg);
    expect(png).not.toBeNull();
    const card = adaptiveCard(message, { png, alt: message.chart?.alt ?? "" });
    const size = Buffer.byteLength(JSON.stringify(card));
    // Measured here: PNG 7.7 KB, the whole card 14.9 KB.
    expect(png?.length ?? 0).toBeLessThan(16_000);
    expect(size).toBeLessThan(28_000);
  });

  it("leaves the image out, with a warning, when it would be too large", () => {
    const logger = new MemoryLogger();
    expect(cardChartRenderer({ logger, maxBytes: 2_000 })(svg)).toBeNull();
    expect(logger.records.map((r) => r.level)).toEqual(["warn"]);
  });

  it("the indexed encoder refuses an image of more than 256 colours", () => {
    const rgba = new Uint8Array(300 * 4);
    for (let k = 0; k < 300; k++) rgba.set([k & 0xff, k >> 8, 0, 255], k * 4);
    expect(encodeIndexedPng({ width: 300, height: 1, rgba })).toBeNull();
    const small = encodeIndexedPng({ width: 256, height: 1, rgba: rgba.subarray(0, 256 * 4) });
    expect(small?.subarray(12, 16).toString("ascii")).toBe("IHDR");
  });
});
