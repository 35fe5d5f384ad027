/**
 * Differencing attacks (DESIGN.md §7): two answers for the same period must not combine into an
 * unnamed member's share. Each attack is run through the real commands on a store; the test first
 * shows, from the reports themselves, that the attack would recover the share to ±5 points if the
 * figure were shown, then checks that the bot's answers do not let it.
 * The attacks are the classic differencing of tables with nested or overlapping cells
 * (Hundepool et al. 2012, "Statistical Disclosure Control", Wiley, §5.2, "disclosure by
 * differencing"; from memory).
 */
import { describe, expect, it } from "vitest";
import { analyzeSnapshot } from "../../src/analysis/analyze-snapshot.js";
import { readChannelSettings } from "../../src/commands/channel-settings-store.js";
import { analysisSettingsFor } from "../../src/domain/channel-settings.js";
import { parseDateRange } from "../../src/domain/date-range.js";
import type { AnalysisReport } from "../../src/domain/report.js";
import { analyzeForPage } from "../../src/report/charts/page-analysis.js";
import { disclosureInput } from "../../src/report/group-membership.js";
import { reportPage } from "../../src/report/report-page.js";
import {
  CHANNEL,
  DAY,
  HOUR,
  mentions,
  NAMES,
  type Runner,
  runner,
  T0,
} from "../commands/channel-fixture.js";
import { inferredWidths, type Scenario } from "./reader-inference.js";

const BAND = 0.1;
const OUTSIDER = "UZED";
const SEVEN = ["UANA", "UBO", "UCY", "UDEE", "UELI", "UFAY", "UGUS"];

/** Seven members; most attention goes to UANA, then UBO, then along a ring. */
async function sevenMembers(options: { named?: readonly string[] } = {}): Promise<Runner> {
  const r = await runner();
  for (const m of SEVEN) {
    await r.run(m, options.named?.includes(m) ? "join named" : "join", { now: T0 });
  }
  const plan: [string, string, number][] = [
    ["UBO", "UANA", 9],
    ["UCY", "UANA", 8],
    ["UDEE", "UANA", 6],
    ["UELI", "UANA", 5],
    ["UFAY", "UBO", 6],
    ["UGUS", "UBO", 5],
    ["UANA", "UBO", 4],
    ["UCY", "UBO", 3],
    ["UANA", "UCY", 2],
    ["UBO", "UCY", 2],
    ["UDEE", "UELI", 2],
    ["UELI", "UFAY", 1],
    ["UFAY", "UGUS", 1],
    ["UGUS", "UDEE", 1],
  ];
  let k = 0;
  for (const [from, to, times] of plan) {
    await mentions(r.store, { from, to, times, at: T0 + DAY + k * HOUR });
    k++;
  }
  return r;
}

async function reportAt(r: Runner, now: number): Promise<AnalysisReport> {
  const settings = await readChannelSettings(r.store, CHANNEL);
  const snapshot = await r.store.loadSnapshot(CHANNEL);
  return analyzeSnapshot(snapshot, analysisSettingsFor(settings), { until: now });
}

/** The report's member id of a platform id (platform id when named, else the pseudonym). */
function idOf(r: Runner, report: AnalysisReport, platformId: string): string {
  const ids = [platformId, `~${r.store.memberKey(platformId)}`];
  return (report.influence ?? []).find((e) => ids.includes(e.member))?.member ?? "";
}

function scenario(
  r: Runner,
  report: AnalysisReport,
  options: { namesOn: boolean; groups?: Record<string, string[]> },
): Scenario {
  const known = new Map<string, string[]>();
  for (const e of report.influence ?? []) {
    if (options.namesOn && e.named) known.set(e.member, [NAMES[e.member] ?? e.member]);
  }
  const groups = new Map(
    Object.entries(options.groups ?? {}).map(([label, ids]) => [
      label,
      ids.map((id) => idOf(r, report, id)),
    ]),
  );
  return {
    members: (report.influence ?? []).map((e) => ({ id: e.member, share: e.share })),
    known,
    reader: null,
    groups,
  };
}

const NOW = T0 + 20 * DAY;

describe("differencing: check against check after a relabel (same period)", () => {
  it("the second answer hides the group, so the two group shares cannot be subtracted", async () => {
    const r = await sevenMembers();
    await r.run("UBOSS", "set minmembers 3", { now: T0 });
    for (const m of ["UBO", "UCY", "UDEE"]) {
      await r.run("UBOSS", `group ${m} night`, { now: NOW - HOUR });
    }
    const first = await r.run(OUTSIDER, "check", { now: NOW });
    expect(first.message.text).toMatch(/night\s+\d+% of influence/);
    await r.run("UBOSS", "group UELI night", { now: NOW + 60_000 });
    const later = NOW + 120_000;

    // The attack, on the reports: the group's share grows by UELI's share.
    const before = await reportAt(r, NOW);
    const after = await reportAt(r, later);
    const night = (rep: AnalysisReport) => rep.groups?.find((g) => g.group === "night")?.share ?? 0;
    const eli = (after.influence ?? []).find((e) => e.member === idOf(r, after, "UELI"));
    expect(Math.abs(night(after) - night(before) - (eli?.share ?? 1))).toBeLessThan(0.01);

    // The bot's second answer withholds the group's share, to members and facilitators alike.
    const second = await r.run(OUTSIDER, "check", { now: later });
    expect(second.message.text).not.toMatch(/night\s+\d+%/);
    expect(second.message.text).toMatch(/hidden: its members changed within this window/);
    const boss = await r.run("UBOSS", "check", { now: later });
    expect(boss.message.text).toMatch(/night\s+hidden: its members changed within this window/);
    const widths = inferredWidths(
      [first.message.blocks, second.message.blocks],
      scenario(r, after, { namesOn: false, groups: { night: ["UBO", "UCY", "UDEE", "UELI"] } }),
    );
    // No share fits every figure read (−∞: the two answers' roundings leave no consistent
    // assignment) or the fitting shares span more than the band: either way UELI's is not pinned.
    const eliWidth = widths.get(idOf(r, after, "UELI")) ?? Number.POSITIVE_INFINITY;
    expect(eliWidth === Number.NEGATIVE_INFINITY || eliWidth > BAND).toBe(true);

    // A whole window later the data no longer overlaps: the group is shown again.
    const next = NOW + 30 * DAY;
    const settled = disclosureInput({
      snapshot: await r.store.loadSnapshot(CHANNEL),
      report: await reportAt(r, next),
      minMembers: 3,
    });
    expect(settled.unsettledGroups).toEqual([]);
  });
});

describe("differencing: check against whatif cap (same period)", () => {
  it("whatif shows channel figures only, so it adds nothing to a check that withholds shares", async () => {
    // Six named, one counted (UGUS): with names on, 100% minus the named shares is UGUS's share.
    const r = await sevenMembers({ named: ["UANA", "UBO", "UCY", "UDEE", "UELI", "UFAY"] });
    await r.run("UBOSS", "set names on", { now: T0 });
    await r.run("UBOSS", "set minmembers 3", { now: T0 });
    const report = await reportAt(r, NOW);
    const gus = idOf(r, report, "UGUS");
    const named = (report.influence ?? []).filter((e) => e.named);
    const gusShare = (report.influence ?? []).find((e) => e.member === gus)?.share ?? 0;
    expect(Math.abs(1 - named.reduce((a, e) => a + e.share, 0) - gusShare)).toBeLessThan(1e-5);

    const check = await r.run(OUTSIDER, "check", { now: NOW });
    expect(check.message.text).toContain("Individual shares are withheld");
    const whatif = await r.run(OUTSIDER, "whatif cap 0.25", { now: NOW });
    for (const text of [check.message.text, whatif.message.text]) {
      for (const id of SEVEN) expect(text).not.toContain(NAMES[id]);
    }
    expect(whatif.message.blocks.some((b) => b.kind === "bars")).toBe(false);
    const widths = inferredWidths(
      [check.message.blocks, whatif.message.blocks],
      scenario(r, report, { namesOn: true }),
    );
    expect(widths.get(gus)).toBeGreaterThan(BAND);
  });
});

describe("differencing: compare of two ranges that differ by one member's join", () => {
  it("neither the compare answer nor the report page's period bars single out the newcomer", async () => {
    const r = await runner();
    const six = ["UANA", "UBO", "UCY", "UDEE", "UELI", "UFAY"];
    for (const m of six) await r.run(m, "join named", { now: T0 });
    await r.run("UBOSS", "set names on", { now: T0 });
    await r.run("UBOSS", "set minmembers 3", { now: T0 });
    let k = 0;
    for (const from of six) {
      for (const to of six) {
        if (from === to) continue;
        k++;
        await mentions(r.store, { from, to, times: 1 + (k % 3), at: T0 + DAY + k * HOUR });
      }
    }
    // UGUS joins counted on 2026-11-12 and is answered by everyone that day.
    const join = Date.UTC(2026, 10, 12, 8, 0, 0);
    await r.run("UGUS", "join", { now: join });
    for (const from of six)
      await mentions(r.store, { from, to: "UGUS", times: 2, at: join + HOUR });
    await mentions(r.store, { from: "UGUS", to: "UANA", times: 3, at: join + 2 * HOUR });

    const a = "2026-11-02..2026-11-11";
    const b = "2026-11-02..2026-11-12";
    const compared = await r.run(OUTSIDER, `compare ${a} ${b}`, { now: NOW });
    const text = compared.message.text;
    expect(text).toContain("of 6 effective voices");
    expect(text).toContain("of 7 effective voices");
    expect(compared.message.blocks.some((x) => x.kind === "bars")).toBe(false);
    for (const id of [...six, "UGUS"]) expect(text).not.toContain(NAMES[id]);

    // The page draws each period's bars: B's would show six named shares and leave UGUS's.
    const settings = analysisSettingsFor(await readChannelSettings(r.store, CHANNEL));
    const snapshot = await r.store.loadSnapshot(CHANNEL);
    const analysis = analyzeForPage(snapshot, settings, {
      until: NOW,
      ranges: { a: parseDateRange(a), b: parseDateRange(b) },
    });
    const html = reportPage({
      ...analysis,
      policy: { namesOn: true, reader: OUTSIDER, disclosure: { minMembers: 3 } },
      generatedAt: NOW,
    });
    expect(html).toContain('data-chart="shares-a"');
    expect(html).not.toContain('data-chart="shares-b"');
  });
});
