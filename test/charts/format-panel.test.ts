/**
 * Meeting formats on the report page, on the demo's channel (8 weeks: coordinator-led from
 * 2026-10-05, rotating-hosts from 2026-11-02, as demo-scenario.ts sets them) with one day of
 * written-first added on 2026-11-16, too short to count: the periods are bands on both weekly
 * charts, named in the legend and above the plot, each hatching defined in its own chart; every
 * week's table row names the format that ran; the panel gives each format's figures with ranges
 * as `compare formats` computes them, the verdict, and the period left out and why. A page
 * without format periods has neither.
 */
import { describe, expect, it } from "vitest";
import { DEMO_CHANNEL, DEMO_START, demoEvents } from "../../adapters/local/demo-scenario.js";
import { DAY_MS, DEFAULT_SETTINGS } from "../../src/domain/settings.js";
import { analyzeForPage } from "../../src/report/charts/page-analysis.js";
import { reportPage } from "../../src/report/report-page.js";
import { snapshotOf } from "../report/log-builders.js";
import { FIXTURE_SETTINGS, twoPhaseSnapshot } from "./chart-fixtures.js";

const demo = snapshotOf(demoEvents(), DEMO_CHANNEL);
const shortAt = DEMO_START + 42 * DAY_MS;
const snapshot = {
  ...demo,
  formats: [
    ...(demo.formats ?? []),
    { at: shortAt, format: "written-first" },
    { at: shortAt + DAY_MS, format: "rotating-hosts" },
  ],
};
const analysis = analyzeForPage(snapshot, { ...DEFAULT_SETTINGS, samples: 100, seed: 3 });
const html = reportPage({
  ...analysis,
  policy: { namesOn: true, disclosure: { minMembers: 3 } },
  generatedAt: Date.UTC(2026, 11, 1),
});
const svgOf = (kind: string) =>
  new RegExp(`<svg [^>]*data-chart="${kind}"[\\s\\S]*?</svg>`).exec(html)?.[0] ?? "";
const TRENDS = ["effective-voices-trend", "top-share-trend"];

describe("format periods on the weekly charts", () => {
  it("draws every period inside the plotted weeks as a band, named in the legend and above the plot", () => {
    for (const kind of TRENDS) {
      const svg = svgOf(kind);
      // coordinator-led (clipped at the first week), rotating-hosts, written-first, rotating-hosts.
      expect(svg.match(/class="format-band"/g)?.length, kind).toBe(4);
      for (const name of ["coordinator-led", "rotating-hosts", "written-first"]) {
        expect(svg, kind).toContain(`<title>format ${name}</title>`);
        expect(svg, kind).toContain(`>format ${name}</text>`);
      }
      const labels = [...svg.matchAll(/class="band-label">([^<]*)</g)].map((m) => m[1]);
      expect(labels, kind).toEqual(expect.arrayContaining(["coordinator-led", "rotating-hosts"]));
      // Same format, same hatching; each hatching is defined in the chart that uses it.
      const refs = [...svg.matchAll(/url\(#([\w-]+)\)/g)].map((m) => m[1]);
      expect(new Set(refs).size, kind).toBe(3);
      for (const id of refs) expect(svg, `${kind} ${id}`).toContain(`<pattern id="${id}"`);
    }
  });

  it("is self-contained: the only url( references are hatchings in the same chart", () => {
    const all = [...html.matchAll(/url\(([^)]*)\)/g)].map((m) => m[1]);
    expect(all.length).toBeGreaterThan(0);
    for (const ref of all) expect(ref).toMatch(/^#[\w-]+-period-\d$/);
    expect(html).not.toMatch(/<script|<link|<img|<iframe|<object|@import/i);
  });

  it("names the format of every week in the charts' tables", () => {
    const table = /<summary>Table: effective voices per week[\s\S]*?<\/table>/.exec(html)?.[0];
    expect(table).toContain("format that week");
    // The week ending 2026-11-06 began under coordinator-led; rotating-hosts started 11-02.
    expect(table).toMatch(
      /2026-11-06<\/span><\/th>(<td>[^<]*<\/td>){3}<td>coordinator-led, then rotating-hosts<\/td>/,
    );
    expect(table).toMatch(/2026-10-23<\/span><\/th>(<td>[^<]*<\/td>){3}<td>coordinator-led<\/td>/);
  });
});

describe("format comparison panel", () => {
  const formats = analysis.formats;
  const panel = /<section id="formats">[\s\S]*?<\/section>/.exec(html)?.[0] ?? "";

  it("shows each format's balance, effective voices and largest share with their ranges", () => {
    expect(formats).not.toBeNull();
    for (const f of formats?.formats ?? []) {
      if (f.balance === null || f.effectiveVoices === null || f.topShare === null) {
        expect(panel).toMatch(new RegExp(`${f.format}</th><td[^>]*>no figure`));
        continue;
      }
      const b = f.balance;
      expect(panel).toContain(
        `>${b.value.toFixed(2)} (${b.low.toFixed(2)}–${b.high.toFixed(2)})</td>`,
      );
      const ev = f.effectiveVoices;
      expect(panel).toContain(
        `>${ev.value.toFixed(1)} (${ev.low.toFixed(1)}–${ev.high.toFixed(1)})</td>`,
      );
    }
    // rotating-hosts ran twice around the short period; both count.
    expect(panel).toMatch(/rotating-hosts<\/th>(<td[^>]*>[^<]*<\/td>){3}<td[^>]*>2 of 2<\/td>/);
  });

  it("says how sure the difference is, and which period was left out and why", () => {
    expect(panel).toMatch(/&quot;rotating-hosts&quot; spread influence more evenly/);
    expect(panel).toContain("the chance that it is more balanced is over 99%");
    expect(panel).toMatch(/Left out: written-first .*2026-11-16.*\(too short\)/);
    expect(panel).toMatch(
      /written-first<\/th><td>.*?<\/td><td>–<\/td><td>–<\/td><td>left out: too short<\/td>/,
    );
  });

  it("is absent, with the bands, from a channel without formats", () => {
    const plain = analyzeForPage(twoPhaseSnapshot(), FIXTURE_SETTINGS);
    expect(plain.formats).toBeNull();
    const page = reportPage({ ...plain, policy: { namesOn: true }, generatedAt: 0 });
    expect(page).not.toContain('id="formats"');
    expect(page).not.toContain("format-band");
  });
});
