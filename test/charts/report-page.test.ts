/**
 * The report page: one self-contained file (no script, no external reference, a CSP that forbids
 * fetching), every chart, the figures, the how to read and the full cautions (DESIGN.md §7), and
 * names only under the naming rules (DESIGN.md §6).
 */
import { describe, expect, it } from "vitest";
import { parseDateRange } from "../../src/domain/date-range.js";
import { CAUTIONS_FULL } from "../../src/report/cautions.js";
import { analyzeForPage } from "../../src/report/charts/page-analysis.js";
import { escapeXml } from "../../src/report/charts/svg.js";
import { reportPage } from "../../src/report/report-page.js";
import { COUNTED_IDS, FIXTURE_SETTINGS, NAMED_IDS, twoPhaseSnapshot } from "./chart-fixtures.js";

const snapshot = twoPhaseSnapshot();
const day = new Date(snapshot.lastEventAt ?? 0).toISOString().slice(0, 10);
const analysis = analyzeForPage(snapshot, FIXTURE_SETTINGS, {
  ranges: { a: parseDateRange("2026-10-06..2026-11-02"), b: parseDateRange(`2026-11-03..${day}`) },
});

function page(namesOn: boolean, reader?: string): string {
  return reportPage({
    ...analysis,
    // Six members, two named: k = 3 leaves enough members unnamed for individual shares.
    policy: { namesOn, ...(reader ? { reader } : {}), disclosure: { minMembers: 3 } },
    generatedAt: Date.UTC(2026, 11, 1),
  });
}

describe("report page", () => {
  const html = page(true);

  it("is self-contained: inline style and SVG only, nothing fetched", () => {
    expect(html).not.toMatch(/<script|<link|<img|<iframe|<object|@import|url\(/i);
    expect(html).not.toMatch(/\s(src|href)=/i);
    const urls = html.match(/https?:\/\/[^\s"'<>]+/g) ?? [];
    expect(new Set(urls)).toEqual(new Set(["http://www.w3.org/2000/svg"]));
    expect(html).toContain(`http-equiv="Content-Security-Policy" content="default-src 'none';`);
  });

  it("holds every chart, the figures, the how to read and the cautions", () => {
    for (const kind of [
      "shares",
      "attention-map",
      "effective-voices-trend",
      "top-share-trend",
      "compare",
      "shares-a",
      "shares-b",
    ]) {
      expect(html).toContain(`data-chart="${kind}"`);
    }
    expect(html).toContain("Effective voices");
    expect(html).toContain("The model in plain words");
    for (const caution of CAUTIONS_FULL) expect(html).toContain(escapeXml(caution));
    expect(html).toContain("@media print");
    expect(html).toContain('name="viewport"');
  });

  it("never shows a counted member's id; named ids only with names on", () => {
    const off = page(false);
    for (const id of COUNTED_IDS) {
      expect(html).not.toContain(id);
      expect(off).not.toContain(id);
    }
    for (const id of NAMED_IDS) {
      expect(html).toContain(id);
      expect(off).not.toContain(id);
    }
  });

  it("shows the reader as you, and still nobody else unnamed", () => {
    const mine = page(false, "zq-counted-2");
    expect(mine).toContain("you (zq-counted-2)");
    for (const id of COUNTED_IDS.filter((id) => id !== "zq-counted-2"))
      expect(mine).not.toContain(id);
  });

  it("escapes display names", () => {
    const evil = reportPage({
      ...analysis,
      policy: {
        namesOn: true,
        displayName: (m) => `<b onload="x">${m}</b>`,
        disclosure: { minMembers: 3 },
      },
      generatedAt: 0,
    });
    expect(evil).not.toContain("<b onload");
    expect(evil).toContain("&lt;b onload=&quot;x&quot;&gt;");
  });

  it("gives every chart a visible title, an accessible name and its table", () => {
    const svgs = html.match(/<svg[\s\S]*?<\/svg>/g) ?? [];
    expect(svgs.length).toBe(7);
    for (const svg of svgs) {
      expect(svg).toMatch(
        /^<svg [^>]*role="img"[^>]*aria-labelledby="chart-[\w-]+-title chart-[\w-]+-desc"/,
      );
      expect(svg).toContain('class="chart-title"');
      expect(svg).toContain('class="legend"');
    }
    const figures = html.match(/<figure[\s\S]*?<\/figure>/g) ?? [];
    expect(figures.length).toBe(7);
    for (const f of figures)
      expect(f).toMatch(/<details class="chart-table"><summary>Table: [\s\S]*?<\/summary><table>/);
    // The map's narrow-screen list names every member the map shows, in share order.
    const list = /<div class="map-list">[\s\S]*?<\/ol>/.exec(html)?.[0] ?? "";
    const influence = analysis.report.influence ?? [];
    expect(list.match(/<li>/g)?.length).toBe(influence.length);
  });

  it("draws both compared periods' bars on one axis and keeps dates whole", () => {
    const last = (kind: string) => {
      const svg =
        new RegExp(`<svg [^>]*data-chart="${kind}"[\\s\\S]*?</svg>`).exec(html)?.[0] ?? "";
      const ticks = [...svg.matchAll(/>(\d+)%<\/text>/g)].map((m) => Number(m[1]));
      return Math.max(...ticks);
    };
    expect(last("shares-a")).toBeGreaterThanOrEqual(10);
    expect(last("shares-a")).toBe(last("shares-b"));
    expect(html).toMatch(/<h2>Compare: A <span class="nowrap">2026-10-06\.\.2026-11-02<\/span>/);
  });
});
