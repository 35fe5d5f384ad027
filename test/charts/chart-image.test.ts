/**
 * The chat image of the share bars: a PNG (signature and IHDR layout per W3C 2003, "Portable
 * Network Graphics (PNG) Specification (Second Edition)", §5.2 and §11.2.2) at twice the SVG's
 * size; null, with a logged warning, when it cannot be made; null without shares.
 */
import { describe, expect, it } from "vitest";
import { sharesChartPng, svgToPng } from "../../adapters/chart-image.js";
import type { AnalysisReport } from "../../src/domain/report.js";
import { MemoryLogger } from "../../src/ports/logger.js";
import { fixtureAnalysis } from "./chart-fixtures.js";

describe("shares chart PNG", () => {
  const { report } = fixtureAnalysis();

  it("renders a PNG twice the chart's width", () => {
    const png = sharesChartPng(report, { namesOn: false });
    expect(png).not.toBeNull();
    const bytes = png ?? Buffer.alloc(0);
    expect([...bytes.subarray(0, 8)]).toEqual([0x89, 0x50, 0x4e, 0x47, 0x0d, 0x0a, 0x1a, 0x0a]);
    expect(bytes.subarray(12, 16).toString("ascii")).toBe("IHDR");
    expect(bytes.readUInt32BE(16)).toBe(920);
    expect(bytes.readUInt32BE(20)).toBeGreaterThan(300);
  });

  it("gives null without shares", () => {
    const insufficient = { ...report, status: "insufficient" as const, influence: null };
    expect(sharesChartPng(insufficient, { namesOn: false })).toBeNull();
  });

  it("logs and gives null when rendering fails", () => {
    const logger = new MemoryLogger();
    // A damaged report (no settings) makes the chart code throw; the digest must still post.
    const damaged = { ...report, settings: undefined } as unknown as AnalysisReport;
    const broken = sharesChartPng(damaged, { namesOn: false }, { logger });
    expect(broken).toBeNull();
    expect(logger.records.map((r) => r.level)).toEqual(["warn"]);
  });
});

describe("svgToPng", () => {
  const square = `<svg xmlns="http://www.w3.org/2000/svg" width="40" height="20" viewBox="0 0 40 20"><rect x="0" y="0" width="20" height="20" fill="#000"/></svg>`;

  it("renders a small SVG at twice its size, or at a given width", () => {
    const png = svgToPng(square) ?? Buffer.alloc(0);
    expect([...png.subarray(0, 8)]).toEqual([0x89, 0x50, 0x4e, 0x47, 0x0d, 0x0a, 0x1a, 0x0a]);
    expect(png.subarray(12, 16).toString("ascii")).toBe("IHDR");
    expect(png.readUInt32BE(16)).toBe(80);
    expect(png.readUInt32BE(20)).toBe(40);
    const wide = svgToPng(square, { width: 100 }) ?? Buffer.alloc(0);
    expect(wide.readUInt32BE(16)).toBe(100);
    expect(wide.readUInt32BE(20)).toBe(50);
  });

  it("gives null and one warning, without the markup, for SVG it cannot parse", () => {
    const logger = new MemoryLogger();
    expect(svgToPng("<svg SECRET-NAME-Q9 not closed", { logger })).toBeNull();
    expect(logger.records.map((r) => r.level)).toEqual(["warn"]);
    expect(JSON.stringify(logger.records)).not.toContain("SECRET-NAME-Q9");
  });
});
