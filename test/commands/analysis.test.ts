/**
 * `check`, `compare`, `whatif cap`, `group`, `explain` and `help` through `handleCommand`, on
 * small invented channels. Figures are checked against a closed form: for mutual, equal attention
 * (symmetric counts C) with no prior (`set background 0`), the stationary vector is
 * s_i = c_i / Σ C, by reversibility of a random walk on a weighted undirected graph (Levin, Peres
 * & Wilmer, Markov Chains and Mixing Times, 2nd ed. 2017, §1.6, detailed balance; from memory).
 */
import { describe, expect, it } from "vitest";
import { CAUTIONS_FULL } from "../../src/report/cautions.js";
import { HELP_ENTRIES } from "../../src/report/help-text.js";
import { busyChannel, DAY, mentions, runner, T0 } from "./channel-fixture.js";

/** Five members on a ring with unequal, mutual tie strengths; no decay. */
async function ringChannel() {
  const r = await runner();
  const members = ["UANA", "UBO", "UCY", "UDEE", "UELI"];
  for (const m of members) await r.run(m, "join", { now: T0 });
  const ties: [string, string, number][] = [
    ["UANA", "UBO", 4],
    ["UBO", "UCY", 1],
    ["UCY", "UDEE", 2],
    ["UDEE", "UELI", 3],
    ["UELI", "UANA", 5],
  ];
  let k = 0;
  for (const [u, v, w] of ties) {
    await mentions(r.store, { from: u, to: v, times: w, at: T0 + DAY + k++ * 3_600_000 });
    await mentions(r.store, { from: v, to: u, times: w, at: T0 + DAY + k++ * 3_600_000 });
  }
  await r.run("UBOSS", "set halflife 0");
  await r.run("UBOSS", "set background 0");
  return r;
}

describe("check", () => {
  it("matches the closed form on a symmetric ring", async () => {
    const r = await ringChannel();
    // Degrees: ANA 9, BO 5, CY 3, DEE 5, ELI 8; Σ C = 30.
    const shares = [9, 5, 3, 5, 8].map((x) => x / 30);
    const voices = 1 / shares.reduce((s, x) => s + x * x, 0); // 900 / 204 ≈ 4.41
    const text = (await r.run("UBO", "check")).message.text;
    expect(text).toMatch(/Active members\s+5\s+\(30 replies and mentions\)/);
    expect(text).toContain(`Effective voices  ${voices.toFixed(1)} of 5`);
    expect(text).toContain(`Largest share     ${Math.round(shares[0] * 100)}%`);
    const me = (await r.run("UCY", "me")).message.text;
    expect(me).toMatch(new RegExp(`Your share\\s+${Math.round(shares[2] * 100)}%, interval`));
    expect(me).toContain("5th of 5");
  });

  it("an empty command is a check, privately", async () => {
    const r = await ringChannel();
    const response = await r.run("UBO", "   ");
    expect(response.visibility).toBe("private");
    expect(response.message.text).toContain("Influence balance");
    expect(response.message.text).toContain("Shown only to you");
  });

  it("group labels show up as group shares", async () => {
    const r = await busyChannel();
    await r.run("UBOSS", "set minmembers 3");
    const labelled = await r.run("UBOSS", "group <@UCY|cy> night shift");
    expect(labelled.message.text).toContain('Cy Cedar is now in the group "night shift"');
    await r.run("UBOSS", "group @UDEE night shift");
    // Two members: fewer than k = 3, so hidden (the facilitator still sees the label).
    const small = (await r.run("UBOSS", "check")).message.text;
    expect(small).toMatch(/night shift\s+hidden: fewer than 3 members/);
    expect((await r.run("UBO", "check")).message.text).not.toContain("night shift");
    await r.run("UBOSS", "group @UELI night shift");
    // A member reading knows their own share: with 6 members either part would then leave only
    // 2 unknown, so the group stays hidden to every member (complementary suppression).
    expect((await r.run("UBO", "check")).message.text).toMatch(/1 group\s+hidden/);
    // A reader outside the counted members, names off: both parts keep 3 unknown members.
    const text = (await r.run("UGUS", "check")).message.text;
    expect(text).toMatch(/night shift\s+\d+% of influence\s+\(50% of members \(3\)/);
    await r.run("UBOSS", "group UCY clear");
    await r.run("UBOSS", "group UDEE clear");
    expect((await r.run("UBO", "check")).message.text).not.toContain("night shift");
  });

  it("group refuses members who have not joined, and bad labels", async () => {
    const r = await busyChannel();
    expect((await r.run("UBOSS", "group UGUS design")).message.text).toContain("has not joined");
    expect((await r.run("UBOSS", "group UCY")).message.text).toContain("Give the group label");
    expect((await r.run("UBOSS", "group")).message.text).toContain("Name the member");
    expect((await r.run("UBOSS", `group UCY ${"x".repeat(41)}`)).message.text).toContain(
      "up to 40 characters",
    );
  });
});

describe("compare and whatif", () => {
  it("compare defaults to the last 28 whole days against the 28 before, sharing no day", async () => {
    const r = await busyChannel();
    const text = (await r.run("UBO", "compare")).message.text;
    // now = 2026-11-22 09:00 UTC, 28 days: B is 2026-10-26 to 2026-11-22 (28 days, both ends
    // included), A the 28 days before it, ending 2026-10-25.
    expect(text).toContain("A 2026-09-28..2026-10-25");
    expect(text).toContain("B 2026-10-26..2026-11-22");
    expect(text).toContain("too little data");
  });

  it("compare takes two ranges, and explains a bad one", async () => {
    const r = await busyChannel();
    const text = (await r.run("UBO", "compare 2026-10-01..2026-10-31 2026-11-01..2026-11-22"))
      .message.text;
    expect(text).toContain("A 2026-10-01..2026-10-31");
    expect(text).toContain("B 2026-11-01..2026-11-22");
    expect(text).toContain("of 6 effective voices");
    const bad = (await r.run("UBO", "compare 2026-11-31..2026-12-01 2026-11-01..2026-11-22"))
      .message.text;
    expect(bad).toContain("is not a calendar date");
    expect(bad).toContain("YYYY-MM-DD..YYYY-MM-DD");
    const one = (await r.run("UBO", "compare 2026-11-01..2026-11-22")).message.text;
    expect(one).toContain("two periods, or none; you gave one");
    expect(one).toContain("/influence compare [A B]:");
  });

  it("whatif cap evens out the shares; an infeasible cap names the smallest one", async () => {
    const r = await busyChannel();
    const text = (await r.run("UBO", "whatif cap 25%")).message.text;
    expect(text).toContain("Capped at 25%");
    const change =
      /Effective voices would change by ([+−])(\d+\.\d) \((\d+\.\d) → (\d+\.\d)\)/.exec(text);
    expect(change?.[1]).toBe("+");
    // The change printed is the difference of the two figures printed beside it.
    expect(Number(change?.[2])).toBeCloseTo(Number(change?.[4]) - Number(change?.[3]), 9);
    // Six members: no cap below an even split over the other five (20%) is possible.
    const infeasible = (await r.run("UBO", "whatif cap 0.1")).message.text;
    expect(infeasible).toContain("at least 0.2000");
    expect((await r.run("UBO", "whatif cap lots")).message.text).toContain("whatif cap 0.25");
  });
});

describe("help, unknown input and explain", () => {
  it("help lists every command with one line each", async () => {
    const r = await runner();
    const text = (await r.run("UBO", "help")).message.text;
    for (const entry of HELP_ENTRIES) expect(text).toContain(`/influence ${entry.usage}`);
    for (const command of ["check", "me", "join", "leave", "explain", "status", "compare"]) {
      expect(text).toContain(`/influence ${command}`);
    }
    for (const command of ["whatif cap", "settings", "set", "group", "facilitator add", "help"]) {
      expect(text).toContain(`/influence ${command}`);
    }
  });

  it.each([
    ["chek", "check"],
    ["chekc", "check"],
    ["staus", "status"],
    ["comapre", "compare"],
    ["whatfi", "whatif"],
    ["setings", "settings"],
    ["hlep", "help"],
  ])("a misspelt command %j gets one line: did you mean %j, and its usage", async (input, near) => {
    const r = await runner();
    const response = await r.run("UBO", `${input} post`);
    expect(response.visibility).toBe("private");
    const text = response.message.text.trim();
    expect(text.split("\n")).toHaveLength(1);
    expect(text).toContain(`did you mean \`${near}\`?`);
    expect(text).toContain(`/influence ${near}`);
    expect(text).not.toContain("/influence leave");
  });

  it.each(["frobnicate", "constructor", "__proto__", "xy"])(
    "input %j far from every command points to help, in one line",
    async (input) => {
      const r = await runner();
      const text = (await r.run("UBO", input)).message.text.trim();
      expect(text).toBe(
        `There is no command "${input}". /influence help lists every command in one line each.`,
      );
    },
  );

  it.each([
    ["check banana", "check"],
    ["me now", "me"],
    ["whatif", "whatif"],
    ["whatif 25%", "whatif"],
    ["facilitator promote UCY", "facilitator"],
  ])("a known command with the wrong words (%j) gets that command's usage", async (input, name) => {
    const r = await runner();
    const text = (await r.run("UBO", input)).message.text.trim();
    expect(text.split("\n")).toHaveLength(1);
    const usage = HELP_ENTRIES.filter((e) => e.usage.split(" ")[0] === name);
    for (const e of usage) expect(text).toContain(`/influence ${e.usage}: ${e.summary}`);
    expect(text).not.toContain("/influence leave");
  });

  it("explain covers every figure, the model's assumptions and the full cautions", async () => {
    const r = await runner();
    const text = (await r.run("UBO", "explain")).message.text;
    for (const term of [
      "Influence share",
      "Interval",
      "Effective voices",
      "Balance",
      "Line",
      "Digest",
      "Note",
      "we assume they listen as the channel does",
      "What an interval promises",
      "independent opinions",
      "Silence is not agreement",
      "rough proxy",
    ]) {
      expect(text).toContain(term);
    }
    for (const caution of CAUTIONS_FULL) expect(text).toContain(caution);
    const more = (await r.run("UBO", "explain more")).message.text;
    for (const term of [
      "DeGroot",
      "stationary vector",
      "learnt from the replies themselves",
      "Self-weight",
    ]) {
      expect(text).not.toContain(term);
      expect(more).toContain(term);
    }
  });
});
