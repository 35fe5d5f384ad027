/**
 * Every message builder over a grid of invented channels, analysed through the whole path (log →
 * ledger → model → report): balanced, one leader above the line, a leader on the line, too little
 * data, two closed groups (with and without background attention), 8 members and 6 members. For
 * every message it asserts what a facilitator reading it relies on:
 * - the headline's verdict agrees with the line and with the largest share it prints;
 * - no probability is printed as a certainty (a finite number of posterior draws cannot show one);
 * - every printed change is the difference of the two printed figures beside it;
 * - no term of the trade (issue 14's list) appears outside `explain more` and the CLI's JSON;
 * - a "member k" label is explained exactly once in a message that shows one.
 * The expected figures are the report's own numbers rounded as printed, so the checks are about the
 * wording, whatever the model's figures are; the figures themselves are checked against closed
 * forms in messages.test.ts and test/commands.
 */
import { describe, expect, it } from "vitest";
import { analyzeSnapshot } from "../../src/analysis/analyze-snapshot.js";
import { type CompareReport, comparePeriods } from "../../src/analysis/compare-periods.js";
import { whatIfCap } from "../../src/analysis/what-if.js";
import { DEFAULT_CHANNEL_SETTINGS } from "../../src/domain/channel-settings.js";
import { parseDateRange } from "../../src/domain/date-range.js";
import type { ChatEvent } from "../../src/domain/events.js";
import type { AnalysisReport } from "../../src/domain/report.js";
import { type AnalysisSettings, DAY_MS, DEFAULT_SETTINGS } from "../../src/domain/settings.js";
import { compareBlocks, whatIfBlocks } from "../../src/report/compare-blocks.js";
import { digestMessage, RANK_LABELS } from "../../src/report/digest-blocks.js";
import { decimal1, percent } from "../../src/report/format.js";
import { meBlocks, statusBlocks } from "../../src/report/member-blocks.js";
import { memberLabeller, samePageLabels, sharedRanks } from "../../src/report/naming.js";
import { noteMessage } from "../../src/report/note-blocks.js";
import { plainReading, verdictOf } from "../../src/report/reading.js";
import { renderText } from "../../src/report/render-text.js";
import { reportPage } from "../../src/report/report-page.js";
import { summaryBlocks } from "../../src/report/summary-blocks.js";
import { mentionEvents, mutualPairs, snapshotOf } from "./log-builders.js";

const exact: AnalysisSettings = {
  ...DEFAULT_SETTINGS,
  halfLifeDays: 0,
  samples: 200,
  seed: 7,
  clusters: false,
};

type Pairs = [string, string, number][];

/** Everyone on a ring, mutually, `weight` times each way. */
function ring(members: readonly string[], weight: number): Pairs {
  return mutualPairs(
    members.map((m, k) => [m, members[(k + 1) % members.length]] as [string, string]),
    weight,
  );
}

/** A hub everyone talks with (`spoke` times each way) plus a weak ring among the others. */
function star(leaves: readonly string[], spoke: number): Pairs {
  return [
    ...mutualPairs(
      leaves.map((x) => ["hub", x] as [string, string]),
      spoke,
    ),
    ...ring(leaves, 1),
  ];
}

const SIX = ["a", "b", "c", "d", "e", "f"];
const EIGHT = ["a", "b", "c", "d", "e", "f", "g", "h"];

function analyse(pairs: Pairs, settings: AnalysisSettings = exact): AnalysisReport {
  return analyzeSnapshot(snapshotOf(mentionEvents(pairs)), settings);
}

/** The leader's share, then the same channel read with the line right at it. */
function onTheLine(): AnalysisReport {
  const pairs = star(SIX.slice(1), 6);
  const share = analyse(pairs).top?.share ?? 0;
  return analyse(pairs, { ...exact, threshold: Math.round(share * 100) / 100 });
}

const twoGroups = mutualPairs(
  [
    ["a", "b"],
    ["b", "c"],
    ["c", "a"],
    ["d", "e"],
    ["e", "f"],
    ["f", "d"],
  ],
  3,
);

const GRID: readonly (readonly [string, () => AnalysisReport])[] = [
  ["balanced, 6 members", () => analyse(ring(SIX, 4))],
  ["one leader above the line, 6 members", () => analyse(star(SIX.slice(1), 6))],
  ["a leader on the line, 6 members", onTheLine],
  ["too little data", () => analyse(ring(["a", "b", "c"], 2))],
  ["two closed groups, no background", () => analyse(twoGroups, { ...exact, background: 0 })],
  ["two closed groups, with background", () => analyse(twoGroups)],
  ["8 members, one leader above the line", () => analyse(star(EIGHT.slice(1), 8))],
  ["8 members, balanced", () => analyse(ring(EIGHT, 3))],
];

/** Issue 14's list of words that do not belong in chat, digests, notes or the page. */
const JARGON: readonly RegExp[] = [
  /degroot/i,
  /stationary/i,
  /attention matrix/i,
  /\bsignals?\b/i,
  /posterior/i,
  /\brounds?\b/i,
  /closed group/i,
  /modularity/i,
  /cluster/i,
  /\bHHI\b/,
  /half-life/i,
  /halflife/i,
  /\bwindow\b/i,
  /pooled/i,
  /background/i,
  /self-weight/i,
  /attention received/i,
  /HMAC/i,
  /minmembers/i,
];

/** The text of a report page a reader sees, without its how to read (explain) and chart markup. */
function pageText(html: string): string {
  return html
    .split('<section id="how-to-read">')[0]
    .replace(/<svg[\s\S]*?<\/svg>/g, " ")
    .replace(/<style>[\s\S]*?<\/style>/g, " ")
    .replace(/<meta[^>]*>/g, " ")
    .replace(/<[^>]+>/g, " ")
    .replace(/&quot;/g, '"')
    .replace(/&amp;/g, "&");
}

/** The status answer's own figures: the settings table under it lists the keys to type. */
function statusText(report: AnalysisReport): string {
  const text = renderText(
    statusBlocks({
      report,
      consent: { level: "counted", since: Date.UTC(2026, 10, 1), notice: "2026-11-a" },
      facilitator: false,
      optedIn: report.members,
      settings: DEFAULT_CHANNEL_SETTINGS,
      nextDigest: null,
    }),
  );
  return text.split("\nSettings\n")[0];
}

/** Every message built from one report, by name. */
function messages(report: AnalysisReport, previous: AnalysisReport): [string, string][] {
  const policy = { namesOn: false };
  const member = report.influence?.[1]?.member ?? "a";
  return [
    ["digest", digestMessage({ report, previous, policy }).text],
    ["first digest", digestMessage({ report, previous: null, policy }).text],
    ["note (channel)", noteMessage({ report, policy, audience: "channel" }).text],
    ["note (facilitators)", noteMessage({ report, policy, audience: "facilitators" }).text],
    ["check", renderText(summaryBlocks(report, policy))],
    ["check (a reader)", renderText(summaryBlocks(report, { namesOn: false, reader: member }))],
    ["me", renderText(meBlocks({ report, reader: member, consent: "counted" }))],
    ["status", statusText(report)],
    ["report page", pageText(reportPage({ report, policy, generatedAt: Date.UTC(2026, 11, 1) }))],
  ];
}

/** The probabilities a text prints, as written ("over 99%", "87%"). */
function printedProbabilities(text: string): string[] {
  return [...text.matchAll(/[Pp]robability(?: that [^:]+:)? (over 99%|under 1%|\d+%)/g)].map(
    (m) => m[1],
  );
}

function expectNoCertainty(name: string, text: string): void {
  for (const p of printedProbabilities(text)) {
    if (p === "over 99%" || p === "under 1%") continue;
    const k = Number.parseInt(p, 10);
    expect(k, `${name}: probability ${p}`).toBeGreaterThanOrEqual(1);
    expect(k, `${name}: probability ${p}`).toBeLessThanOrEqual(99);
  }
  expect(text, name).not.toMatch(/100% sure|\(0% sure\)|probability (100|0)%/i);
}

const MINUS = "−";

function signedValue(text: string): number {
  return Number(text.replace(MINUS, "-"));
}

/** Every "±x (a → b)" in a text: the printed change must be b − a, and never zero. */
function expectChangesFromPrinted(name: string, text: string): number {
  let seen = 0;
  for (const m of text.matchAll(
    /([+−]\d+(?:\.\d+)?)(?: points?)? \((<?\d+(?:\.\d+)?)%? → (<?\d+(?:\.\d+)?)%?\)/g,
  )) {
    seen++;
    const [, delta, before, after] = m;
    const shown = (x: string) => (x.startsWith("<") ? 0 : Number(x));
    const digits = delta.includes(".") ? delta.split(".")[1].length : 0;
    expect(signedValue(delta), `${name}: ${m[0]}`).toBeCloseTo(
      Number((shown(after) - shown(before)).toFixed(digits)),
      9,
    );
    expect(signedValue(delta), `${name}: ${m[0]} is no change`).not.toBe(0);
  }
  for (const m of text.matchAll(/no change \((<?[\d.]+%?)\)/g)) {
    seen++;
    expect(m[1], name).toBeTruthy();
  }
  expect(text, `${name}: a zero change must be said in words`).not.toMatch(
    /[±+−]0(?:\.0+)?(?![.\d])/,
  );
  return seen;
}

function expectPlainWords(name: string, text: string): void {
  for (const term of JARGON) expect(text, `${name} uses ${term}`).not.toMatch(term);
}

function expectRankExplained(name: string, text: string): void {
  if (/\bmember \d+\b/.test(text)) {
    expect(text.split(RANK_LABELS).length - 1, `${name}: "member k" explained once`).toBe(1);
  }
}

/** The headline agrees with the line and with the largest share, and prints that share. */
function expectHeadlineAgrees(report: AnalysisReport): void {
  const headline = plainReading(report);
  const verdict = verdictOf(report);
  if (!report.top || !report.influence) {
    expect(["none", "separate"]).toContain(verdict);
    expect(headline).not.toMatch(/evenly|above the/);
    return;
  }
  const largest = Math.max(...report.influence.map((e) => e.share));
  expect(report.top.share).toBe(largest);
  expect(headline.toLowerCase()).toContain(`the largest share, ${percent(largest)}`);
  expect(headline).toContain(`${decimal1(report.effectiveVoices?.value ?? 0)} independent voices`);
  const line = report.line;
  if (line?.crossed) {
    expect(verdict).toBe("above");
    expect(headline).toContain(`is above the ${percent(line.threshold)} line`);
    expect(headline).not.toMatch(/evenly|below the/);
  } else {
    expect(headline).not.toMatch(/is above the/);
    if (line && largest >= line.threshold) {
      // At or over the line without the probability to cross it: "close", never "below".
      expect(verdict).toBe("near");
      expect(headline).toContain("close to the");
    }
    if (verdict === "even" || verdict === "leans" || verdict === "funnels") {
      expect(headline).toContain(`is below the ${percent(line?.threshold ?? 0)} line`);
      expect(largest).toBeLessThan(line?.threshold ?? 1);
    }
  }
}

/**
 * Memoised on first use inside a test. Analyses run while vitest collects the file (in a describe
 * body) would count as "static" code to mutation testing (docs/testing.md), which then reruns
 * every test for every mutant of the pipeline.
 */
function once<T>(make: () => T): () => T {
  let made: { value: T } | undefined;
  return () => {
    made ??= { value: make() };
    return made.value;
  };
}

describe.each(GRID)("every message over a %s channel", (_name, make) => {
  const built = once(() => ({ report: make(), previous: analyse(star(SIX.slice(1), 3)) }));

  it("the headline's verdict agrees with the line and the largest share", () => {
    expectHeadlineAgrees(built().report);
  });

  it("prints no certainty, only changes of printed values, plain words and explained labels", () => {
    const { report, previous } = built();
    for (const [name, text] of messages(report, previous)) {
      expectNoCertainty(name, text);
      expectChangesFromPrinted(name, text);
      expectPlainWords(name, text);
      expectRankExplained(name, text);
    }
  });

  it("whatif says what the cap changes, from printed values, in plain words", () => {
    const { report } = built();
    if (report.status !== "ok") return;
    const events = mentionEvents(
      report.members === 8 ? star(EIGHT.slice(1), 8) : star(SIX.slice(1), 6),
    );
    for (const cap of [0.25, 0.5]) {
      const result = whatIfCap(snapshotOf(events), exact, { cap });
      const text = renderText(whatIfBlocks(result));
      expectNoCertainty("whatif", text);
      expectChangesFromPrinted("whatif", text);
      expectPlainWords("whatif", text);
    }
  });
});

describe("the grid holds what it is meant to", () => {
  it("each row reads as its name says", () => {
    const verdicts = GRID.map(([name, make]) => [name, verdictOf(make())]);
    expect(verdicts).toEqual([
      ["balanced, 6 members", "even"],
      ["one leader above the line, 6 members", "above"],
      ["a leader on the line, 6 members", "near"],
      ["too little data", "none"],
      ["two closed groups, no background", "separate"],
      ["two closed groups, with background", "even"],
      ["8 members, one leader above the line", "above"],
      ["8 members, balanced", "even"],
    ]);
  });

  it("the two closed groups are said in the headline, not only in the structure row", () => {
    const text = plainReading(analyse(twoGroups));
    expect(text).toContain("splits into 2 groups that only answer among themselves");
  });
});

/** Period A: the star; period B, 30 days later: the same members on a balanced ring. */
function comparePair(members: readonly string[]): CompareReport {
  const shift = (events: ChatEvent[], days: number): ChatEvent[] =>
    events.map((e) => ({ ...e, at: e.at + days * DAY_MS }));
  const a = mentionEvents(star(members.slice(1), 6));
  const b = shift(
    mentionEvents(ring(["hub", ...members.slice(1)], 4))
      .filter((e) => e.type === "message")
      .map((e) => (e.type === "message" ? { ...e, id: `b-${e.id}` } : e)),
    30,
  );
  const snapshot = snapshotOf([...a, ...b]);
  return comparePeriods(snapshot, exact, {
    a: parseDateRange("2026-10-20..2026-11-16"),
    b: parseDateRange("2026-11-20..2026-12-17"),
  });
}

describe.each([
  ["6 members", SIX],
  ["8 members", EIGHT],
])("compare, %s", (_name, members) => {
  const pair = once(() => comparePair(members));

  it("prints every change as the difference of the printed figures, and no certainty", () => {
    const result = pair();
    const text = renderText(compareBlocks(result));
    const row = (label: string) => text.split("\n").find((l) => l.startsWith(label)) ?? "";
    const figures = (line: string) => {
      const m = /([\d.]+) of \d+ effective voices .*balance ([\d.]+), largest share (\d+)%/.exec(
        line,
      );
      return m ? [Number(m[1]), Number(m[2]), Number(m[3])] : null;
    };
    const a = figures(row("A "));
    const b = figures(row("B "));
    expect(a && b).toBeTruthy();
    const change = row("Change B − A");
    const said = (what: string, digits: number, k: number) => {
      const m = new RegExp(`${what} (no change|[+−][\\d.]+)`).exec(change);
      const delta = Number(((b?.[k] ?? 0) - (a?.[k] ?? 0)).toFixed(digits));
      expect(m?.[1]).toBe(
        delta === 0 ? "no change" : `${delta > 0 ? "+" : MINUS}${Math.abs(delta).toFixed(digits)}`,
      );
    };
    said("effective voices", 1, 0);
    said("balance", 2, 1);
    said("largest share", 0, 2);
    expectNoCertainty("compare", text);
    expectPlainWords("compare", text);
  });

  it("the report page keeps one member's label in both panels", () => {
    const result = pair();
    const html = reportPage({
      report: result.b.report,
      policy: { namesOn: false },
      compare: result,
      generatedAt: Date.UTC(2026, 11, 18),
    });
    expect(pageText(html).split(RANK_LABELS).length - 1).toBe(1);
    // The labeller the page gives its panels: one member, one label, in the page's own figures
    // (period B here) and in both panels; numbered by the page's own ranking.
    const policy = samePageLabels({ namesOn: false }, result.b.report, result);
    const own = memberLabeller(result.b.report.influence ?? [], { namesOn: false });
    const inA = memberLabeller(result.a.report.influence ?? [], policy);
    const inB = memberLabeller(result.b.report.influence ?? [], policy);
    const members = (result.b.report.influence ?? []).map((e) => e.member);
    expect(members.length).toBe(result.b.report.members);
    for (const m of members) {
      expect(inA(m)).toBe(own(m));
      expect(inB(m)).toBe(own(m));
    }
    // Without the shared numbering, period A's leader would be "member 1" in its panel.
    const leader = result.a.report.top?.member ?? "";
    expect(memberLabeller(result.a.report.influence ?? [], { namesOn: false })(leader)).toBe(
      "member 1",
    );
    expect(inA(leader)).toBe(own(leader));
    // The other way round: panel labels follow A first when no page ranking is given.
    const ranks = sharedRanks([result.a.report.influence, result.b.report.influence]);
    expect(memberLabeller(result.b.report.influence ?? [], { namesOn: false, ranks })(leader)).toBe(
      "member 1",
    );
    expectPlainWords("report page", pageText(html));
    expectNoCertainty("report page", pageText(html));
  });
});
