/**
 * The disclosure rules one by one (DESIGN.md §7; primary and complementary suppression as in
 * Hundepool et al. 2012, "Statistical Disclosure Control", Wiley, ch. 5). Each case first shows
 * the attacker of reader-inference.ts recovering the share from the figure the rule hides, so the
 * test would fail if the rule let the figure through, then checks the message the bot builds.
 */
import { describe, expect, it } from "vitest";
import type { Block } from "../../src/domain/blocks.js";
import { digestBlocks } from "../../src/report/digest-blocks.js";
import { disclose, disclosureK } from "../../src/report/disclosure.js";
import { unsettledGroups } from "../../src/report/group-membership.js";
import { noteBlocks } from "../../src/report/note-blocks.js";
import { renderText } from "../../src/report/render-text.js";
import { summaryBlocks } from "../../src/report/summary-blocks.js";
import { inferredWidths } from "./reader-inference.js";
import { membersFrom, policyFor, scenarioFor, syntheticReport } from "./synthetic.js";

const BAND = 0.1;

function groupRow(label: string, share: number): Block {
  return {
    kind: "figures",
    rows: [{ label: `  ${label}`, value: `${Math.round(share * 100)}% of influence` }],
  };
}

describe("k", () => {
  it("is the channel's minmembers, never below 3", () => {
    expect(disclosureK(1)).toBe(3);
    expect(disclosureK(3)).toBe(3);
    expect(disclosureK(7)).toBe(7);
    expect(disclosureK(undefined)).toBe(5);
  });
});

describe("small groups (primary suppression)", () => {
  // The example: one member labelled "solo" in a channel of 7, all counted.
  const members = membersFrom(
    [30, 20, 13, 12, 10, 8, 7],
    [false, false, false, false, false, false, false],
    [null, null, "solo", null, null, null, null],
  );
  const report = syntheticReport(members);
  const solo = members.find((m) => m.label === "solo");

  it("a group of one gives its member's share away", () => {
    const scenario = scenarioFor(members, false, null);
    const widths = inferredWidths([[groupRow("solo", solo?.share ?? 0)]], scenario);
    expect(widths.get(solo?.id ?? "")).toBeLessThanOrEqual(0.011);
  });

  it("is hidden with one line; the facilitator still sees the label", () => {
    const facilitator = summaryBlocks(
      report,
      policyFor({ members, namesOn: true, reader: "boss", minMembers: 5, facilitator: true }),
    );
    const text = renderText(facilitator);
    expect(text).toMatch(/solo\s+hidden: fewer than 5 members/);
    expect(text).not.toMatch(/solo\s+\d+%/);
    const member = renderText(
      summaryBlocks(report, policyFor({ members, namesOn: false, reader: "u1", minMembers: 5 })),
    );
    expect(member).not.toContain("solo");
    expect(member).toMatch(/1 group\s+hidden: fewer than 5 members/);
    const digest = renderText(
      digestBlocks({
        report,
        previous: null,
        policy: policyFor({ members, namesOn: false, minMembers: 5 }),
      }),
    );
    expect(digest).not.toContain("solo");
  });

  it("a pair is hidden too, and so is a group whose rest of the channel is too small", () => {
    const pair = membersFrom(
      [30, 20, 13, 12, 10, 8, 7],
      [false, false, false, false, false, false, false],
      ["big", "big", "big", "big", "big", "pair", "pair"],
    );
    const shown = disclose(
      syntheticReport(pair),
      policyFor({ members: pair, namesOn: false, minMembers: 3 }),
    );
    expect(shown.groups).toEqual([]);
    expect(shown.hiddenGroups.map((h) => h.group).sort()).toEqual(["big", "pair"]);
  });
});

describe("elimination", () => {
  // Six members, five named: with names on, 100% minus the named shares is u6's share.
  const members = membersFrom(
    [35, 20, 15, 12, 10, 8],
    [true, true, true, true, true, false],
    [null, null, null, null, null, null],
  );
  const report = syntheticReport(members);
  const counted = members.find((m) => !m.named)?.id ?? "";

  it("named shares give the one counted member's share away", () => {
    const bars: Block = {
      kind: "bars",
      caption: "",
      line: null,
      rows: members
        .filter((m) => m.named)
        .map((m) => ({
          label: `Name-${m.id}`,
          value: m.share,
          low: 0,
          high: 1,
          text: "",
        })),
    };
    const widths = inferredWidths([[bars]], scenarioFor(members, true, null));
    expect(widths.get(counted)).toBeLessThanOrEqual(0.001);
  });

  it("withholds individual shares, says why, and keeps the channel figures", () => {
    const policy = policyFor({ members, namesOn: true, minMembers: 3 });
    for (const blocks of [
      summaryBlocks(report, policy),
      digestBlocks({ report, previous: null, policy }),
    ]) {
      const text = renderText(blocks);
      expect(blocks.some((b) => b.kind === "bars")).toBe(false);
      expect(text).toContain(
        "Individual shares are withheld: fewer than 3 members would be left unnamed",
      );
      expect(text).toContain("Effective voices");
      expect(text).toMatch(/Largest share\s+35%/);
      expect(text).not.toContain("Name-");
      const widths = inferredWidths([blocks], scenarioFor(members, true, null));
      expect(widths.get(counted)).toBeGreaterThan(BAND);
    }
    const note = renderText(noteBlocks({ report, policy, audience: "channel" }));
    expect(note).not.toContain("Name-");
    expect(note).toContain("One member's influence share");
  });

  it("shows shares when at least k members stay unnamed", () => {
    const many = membersFrom(
      [35, 20, 15, 12, 10, 8],
      [true, true, false, false, false, false],
      [null, null, null, null, null, null],
    );
    const shown = disclose(
      syntheticReport(many),
      policyFor({ members: many, namesOn: true, reader: "outsider", minMembers: 3 }),
    );
    expect(shown.individual).toBe(true);
  });
});

describe("subtraction inside and outside groups (complementary suppression)", () => {
  it("a group of k whose other members are named is hidden: the named shares subtract out", () => {
    const members = membersFrom(
      [25, 20, 15, 12, 10, 9, 9],
      [true, true, false, false, false, false, false],
      ["team", "team", "team", null, null, null, null],
    );
    const report = syntheticReport(members);
    const policy = policyFor({ members, namesOn: true, reader: "outsider", minMembers: 3 });
    const shown = disclose(report, policy);
    expect(shown.individual).toBe(true);
    expect(shown.groups).toEqual([]);
    const text = renderText(summaryBlocks(report, policy));
    expect(text).not.toMatch(/team\s+\d+%/);
    // The attack the rule stops: group share minus the two named shares.
    const u = members.find((m) => m.label === "team" && !m.named);
    const team = report.groups?.[0].share ?? 0;
    const scenario = scenarioFor(members, true, null);
    const blocks = summaryBlocks(report, policy);
    expect(inferredWidths([[...blocks, groupRow("team", team)]], scenario).get(u?.id ?? "")).toBe(
      0,
    );
  });

  it("two groups shown would leave the unlabelled pair as 100% minus both: one is hidden", () => {
    const members = membersFrom([18, 16, 14, 12, 10, 9, 8, 6, 4, 3], new Array(10).fill(false), [
      "a",
      "b",
      "a",
      "b",
      "a",
      "b",
      "a",
      "b",
      null,
      null,
    ]);
    const report = syntheticReport(members);
    const policy = policyFor({ members, namesOn: false, minMembers: 3 });
    const shown = disclose(report, policy);
    expect(shown.groups?.length).toBeLessThanOrEqual(1);
    const widths = inferredWidths(
      [report.groups?.map((g) => groupRow(g.group, g.share)) ?? []],
      scenarioFor(members, false, null),
    );
    // Without bars the pair's total is known, and each of them is between 0 and that total.
    const pair = members.filter((m) => m.label === null).map((m) => widths.get(m.id) ?? 1);
    expect(Math.max(...pair)).toBeLessThanOrEqual(BAND);
  });

  it("a group of k whose members' shares are close is hidden when the list would place them", () => {
    // Unknown anonymous shares 5, 5, 6 (the group) and 30, 25, 29: only one triple sums to 16%.
    const members = membersFrom([30, 29, 25, 6, 5, 5], new Array(6).fill(false), [
      null,
      null,
      null,
      "night",
      "night",
      "night",
    ]);
    const report = syntheticReport(members);
    const scenario = scenarioFor(members, false, null);
    const unprotected = [
      ...summaryBlocks(report, policyFor({ members, namesOn: false, minMembers: 3 })),
      groupRow("night", report.groups?.find((g) => g.group === "night")?.share ?? 0),
    ];
    expect(inferredWidths([unprotected], scenario).get("u5")).toBeLessThanOrEqual(0.011);
    expect(disclose(report, policyFor({ members, namesOn: false, minMembers: 3 })).groups).toEqual(
      [],
    );
  });
});

describe("groups that changed within the window", () => {
  const day = 86_400_000;
  const until = Date.UTC(2026, 10, 30);
  const from = until - 28 * day;
  const change = (member: string, at: number, group: string | null) => ({ member, at, group });

  it("a relabel after the group had k members makes it unsettled for the window", () => {
    const snapshot = {
      channel: "c1",
      messages: [],
      consent: [],
      lastEventAt: until,
      groups: [
        change("a", from - day, "night"),
        change("b", from - day, "night"),
        change("c", from - day, "night"),
        change("d", until - day, "night"),
      ],
    };
    expect(unsettledGroups(snapshot, { from, until }, 3)).toEqual(["night"]);
    // A whole window later the change is out of the window: settled again.
    const later = { from: from + 29 * day, until: until + 29 * day };
    expect(unsettledGroups(snapshot, later, 3)).toEqual([]);
  });

  it("building a group up to k members for the first time is not a change", () => {
    const snapshot = {
      channel: "c1",
      messages: [],
      consent: [],
      lastEventAt: until,
      groups: [
        change("a", until - 3 * day, "night"),
        change("b", until - 2 * day, "night"),
        change("c", until - day, "night"),
      ],
    };
    expect(unsettledGroups(snapshot, { from, until }, 3)).toEqual([]);
  });
});

describe("hidden groups counted for a member", () => {
  it("says 'hidden' once and lists each distinct reason", async () => {
    const { hiddenGroupRows, hiddenText, singleOutText } = await import(
      "../../src/report/disclosure.js"
    );
    const base = { groups: [], clusters: null, listHiddenLabels: false } as const;
    const rows = hiddenGroupRows({
      ...base,
      hiddenGroups: [
        { group: "a", reason: hiddenText(5) },
        { group: "b", reason: hiddenText(5) },
        { group: "c", reason: singleOutText(5) },
      ],
    } as unknown as Parameters<typeof hiddenGroupRows>[0]);
    expect(rows).toHaveLength(1);
    expect(rows[0].label.trim()).toBe("3 groups");
    expect(rows[0].value).toBe(
      "hidden: fewer than 5 members, or beside the other figures it would single out fewer than 5 members",
    );
    expect(rows[0].value.match(/hidden/g)).toHaveLength(1);
  });
});
