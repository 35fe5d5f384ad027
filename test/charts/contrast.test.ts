/**
 * Colour contrast of the charts and the report page, by the WCAG 2.2 definitions (W3C 2023, "Web
 * Content Accessibility Guidelines (WCAG) 2.2", glossary "relative luminance" and "contrast ratio";
 * success criteria 1.4.3 Contrast (Minimum), 4.5:1 for text, and 1.4.11 Non-text Contrast, 3:1 for
 * graphical objects). The formula is checked first against two values of the trade: black on
 * white is 21:1 (the maximum, from the definition) and #767676 on white is about 4.54:1, the
 * lightest grey that passes 4.5:1 (common practice, WebAIM's contrast checker; from memory).
 * Then every text fill and every mark colour actually used in a rendered page is checked, with
 * stroke and fill opacity blended onto the white chart background.
 */
import { describe, expect, it } from "vitest";
import { DEMO_CHANNEL, demoEvents } from "../../adapters/local/demo-scenario.js";
import { parseDateRange } from "../../src/domain/date-range.js";
import { analyzeForPage } from "../../src/report/charts/page-analysis.js";
import { PAGE_STYLE } from "../../src/report/charts/page-style.js";
import { CHART_COLOURS, OKABE_ITO } from "../../src/report/charts/palette.js";
import { reportPage } from "../../src/report/report-page.js";
import { snapshotOf } from "../report/log-builders.js";
import { FIXTURE_SETTINGS, twoPhaseSnapshot } from "./chart-fixtures.js";

type Rgb = readonly [number, number, number];

function rgb(hex: string): Rgb {
  const h = hex.replace("#", "");
  const full = h.length === 3 ? [...h].map((c) => c + c).join("") : h;
  return [0, 2, 4].map((k) => Number.parseInt(full.slice(k, k + 2), 16)) as unknown as Rgb;
}

/** WCAG 2.2 relative luminance: sRGB channels linearised, weighted 0.2126, 0.7152, 0.0722. */
function luminance(colour: Rgb): number {
  const [r, g, b] = colour.map((v) => {
    const c = v / 255;
    return c <= 0.04045 ? c / 12.92 : ((c + 0.055) / 1.055) ** 2.4;
  });
  return 0.2126 * r + 0.7152 * g + 0.0722 * b;
}

/** WCAG 2.2 contrast ratio (L1 + 0.05) / (L2 + 0.05), L1 the lighter. */
function contrast(a: Rgb, b: Rgb): number {
  const [hi, lo] = [luminance(a), luminance(b)].sort((x, y) => y - x);
  return (hi + 0.05) / (lo + 0.05);
}

/** A colour painted with `opacity` over `under`. */
function blend(colour: Rgb, opacity: number, under: Rgb): Rgb {
  return colour.map((v, k) => Math.round(opacity * v + (1 - opacity) * under[k])) as unknown as Rgb;
}

const WHITE = rgb("#ffffff");

describe("WCAG contrast formula", () => {
  it("gives 21:1 for black on white and about 4.54:1 for #767676", () => {
    expect(contrast(rgb("#000000"), WHITE)).toBeCloseTo(21, 9);
    expect(contrast(rgb("#767676"), WHITE)).toBeCloseTo(4.54, 2);
    expect(contrast(WHITE, WHITE)).toBe(1);
  });
});

describe("chart and page colours", () => {
  it("uses Okabe–Ito marks that reach 3:1 on white, and text colours that reach 4.5:1", () => {
    for (const mark of [
      CHART_COLOURS.share,
      CHART_COLOURS.line,
      CHART_COLOURS.attention,
      CHART_COLOURS.ink,
    ]) {
      expect(
        (Object.values(OKABE_ITO) as string[]).includes(mark) || mark === CHART_COLOURS.ink,
      ).toBe(true);
      expect(contrast(rgb(mark), WHITE), mark).toBeGreaterThanOrEqual(3);
    }
    for (const ink of [CHART_COLOURS.ink, CHART_COLOURS.muted]) {
      expect(contrast(rgb(ink), WHITE), ink).toBeGreaterThanOrEqual(4.5);
    }
    // Orange and sky blue fail 3:1 on white: they may only fill marks that also have an edge.
    expect(contrast(rgb(OKABE_ITO.orange), WHITE)).toBeLessThan(3);
    expect(contrast(rgb(OKABE_ITO.skyBlue), WHITE)).toBeLessThan(3);
  });

  const snapshot = twoPhaseSnapshot();
  const day = new Date(snapshot.lastEventAt ?? 0).toISOString().slice(0, 10);
  const analysis = analyzeForPage(snapshot, FIXTURE_SETTINGS, {
    ranges: {
      a: parseDateRange("2026-10-06..2026-11-02"),
      b: parseDateRange(`2026-11-03..${day}`),
    },
  });
  // k = 3: the fixture's 4 counted members may then be shown, so every chart is drawn.
  const html = reportPage({
    ...analysis,
    policy: { namesOn: true, disclosure: { minMembers: 3 } },
    generatedAt: 0,
  });
  // The demo's page too: its weekly charts carry the format bands (hatching and edges).
  const demo = snapshotOf(demoEvents(), DEMO_CHANNEL);
  const formatsHtml = reportPage({
    ...analyzeForPage(demo, { ...FIXTURE_SETTINGS, samples: 50 }, { historyWeeks: 8 }),
    policy: { namesOn: true, disclosure: { minMembers: 3 } },
    generatedAt: 0,
  });
  const svgs = [
    ...(html.match(/<svg[\s\S]*?<\/svg>/g) ?? []),
    ...(formatsHtml.match(/<svg[\s\S]*?<\/svg>/g) ?? []).filter((svg) =>
      svg.includes("format-band"),
    ),
  ];
  const elements = svgs.flatMap((svg) =>
    [...svg.matchAll(/<(text|line|path|polyline|polygon|circle|rect)\s([^>]*)>/g)].map((m) => ({
      tag: m[1],
      attrs: Object.fromEntries([...m[2].matchAll(/([\w-]+)="([^"]*)"/g)].map((a) => [a[1], a[2]])),
    })),
  );

  it("draws every chart text at 4.5:1 or more on white", () => {
    const texts = elements.filter((e) => e.tag === "text");
    expect(texts.length).toBeGreaterThan(50);
    for (const t of texts) {
      const fill = t.attrs.fill ?? "#000000";
      expect(contrast(rgb(fill), WHITE), `text ${fill}`).toBeGreaterThanOrEqual(4.5);
    }
  });

  it("draws every mark at 3:1 or more, except white, grid lines and edged interval fills", () => {
    // Grid lines are a reading aid: every value they lead to is also written as text.
    const exempt = new Set(["#ffffff", CHART_COLOURS.grid.toLowerCase(), "none"]);
    let checked = 0;
    for (const e of elements.filter((x) => x.tag !== "text")) {
      for (const [paint, opacityAttr] of [
        ["stroke", "stroke-opacity"],
        ["fill", "fill-opacity"],
      ] as const) {
        const colour = e.attrs[paint];
        if (!colour || exempt.has(colour.toLowerCase())) continue;
        // The band's light fill is always drawn with edges in the series colour (checked below).
        if (colour === CHART_COLOURS.interval && e.attrs[opacityAttr] !== undefined) continue;
        // A format band's hatching: its pattern's own lines and dots are checked as marks here
        // (grid grey, a reading aid); the band's edges and its name carry the period.
        if (colour.startsWith("url(#")) continue;
        const opacity = Number(e.attrs[opacityAttr] ?? 1);
        const seen = blend(rgb(colour), opacity, WHITE);
        expect(contrast(seen, WHITE), `${e.tag} ${paint} ${colour}`).toBeGreaterThanOrEqual(3);
        checked += 1;
      }
    }
    expect(checked).toBeGreaterThan(100);
    expect(elements.filter((e) => e.attrs.class === "format-edge").length).toBeGreaterThan(0);
    for (const edge of elements.filter((e) => e.attrs.class === "format-edge")) {
      expect(edge.attrs.stroke).toBe(CHART_COLOURS.muted);
    }
    const bands = html.match(/class="band"/g)?.length ?? 0;
    expect(html.match(/class="band-edge"/g)?.length).toBe(2 * bands);
  });

  it("writes page text at 4.5:1 or more on its backgrounds", () => {
    const value = (name: string) =>
      new RegExp(`--${name}: (#[0-9a-fA-F]{6})`).exec(PAGE_STYLE)?.[1] ?? "";
    const backgrounds = ["#ffffff", "#fdf3ec", "#eef5fb"];
    for (const bg of backgrounds) expect(PAGE_STYLE).toContain(bg);
    for (const ink of [value("ink"), value("muted"), value("accent")]) {
      for (const bg of backgrounds) {
        expect(contrast(rgb(ink), rgb(bg)), `${ink} on ${bg}`).toBeGreaterThanOrEqual(4.5);
      }
    }
  });
});
