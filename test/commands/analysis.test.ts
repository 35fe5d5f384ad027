/**
 * `check`, `compare`, `whatif cap`, `group`, `explain` and `help` through `handleCommand`, on
 * small invented channels. Figures are checked against a closed form: for mutual, equal attention
 * (symmetric counts C) with no prior (`set background 0`), the stationary vector is
 * s_i = c_i / Σ C, by reversibility of a random walk on a weighted undirected graph (Levin, Peres
 * & Wilmer, Markov Chains and Mixing Times, 2nd ed. 2017, §1.6; from memory).
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
    expect(text).toMatch(/Active members\s+5\s+\(30 signals\)/);
    expect(text).toContain(`Effective voices  ${voices.toFixed(1)} of 5`);
    expect(text).toContain(`Largest share     ${Math.round(shares[0] * 100)}%`);
    const me = (await r.run("UCY", "me")).message.text;
    expect(me).toContain(`Your share          ${Math.round(shares[2] * 100)}%, interval`);
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
    const labelled = await r.run("UBOSS", "group <@UCY|cy> night shift");
    expect(labelled.message.text).toContain('Cy Cedar is now in the group "night shift"');
    await r.run("UBOSS", "group @UDEE night shift");
    const text = (await r.run("UBO", "check")).message.text;
    expect(text).toMatch(/night shift\s+\d+% of influence\s+\(33% of members \(2\)/);
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
  it("compare defaults to this window against the one before", async () => {
    const r = await busyChannel();
    const text = (await r.run("UBO", "compare")).message.text;
    // now = 2026-11-22 09:00 UTC, window 28 days.
    expect(text).toContain("A 2026-09-27..2026-10-25");
    expect(text).toContain("B 2026-10-25..2026-11-22");
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
    expect((await r.run("UBO", "compare 2026-11-01..2026-11-22")).message.text).toContain(
      "two periods, or none",
    );
  });

  it("whatif cap evens out the shares; an infeasible cap names the smallest one", async () => {
    const r = await busyChannel();
    const text = (await r.run("UBO", "whatif cap 25%")).message.text;
    expect(text).toContain("Capped at 25%");
    const change = /Effective voices would change by ([+−])/.exec(text);
    expect(change?.[1]).toBe("+");
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
    "frobnicate",
    "check banana",
    "me now",
    "whatif",
    "facilitator promote UCY",
    "constructor",
    "__proto__",
  ])("unknown input %j gets the help text", async (input) => {
    const r = await runner();
    const response = await r.run("UBO", input);
    expect(response.visibility).toBe("private");
    expect(response.message.text).toContain(`I did not understand "${input}"`);
    expect(response.message.text).toContain("/influence help");
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
      "Structure",
      "we assume they listen as the channel does",
      "What it promises",
      "Self-weight",
      "never the shares",
      "independent opinions",
      "Silence is not agreement",
      "rough proxy",
    ]) {
      expect(text).toContain(term);
    }
    for (const caution of CAUTIONS_FULL) expect(text).toContain(caution);
  });
});
