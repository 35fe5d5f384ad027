/**
 * The calibration grid's channel counts (bench/calibrate/plan.ts): leader cells get more channels
 * where they are cheap, so that a per-cell leader verdict is not mostly binomial noise, and
 * `--channels` still sets every cell. The probabilities quoted in plan.ts are checked against the
 * binomial distribution computed here from its definition (common practice; scipy.stats.binom gave
 * the same 0.0995, 0.0538 and 0.0095).
 */
import { describe, expect, it } from "vitest";
import { defaultChannels, parsePlan, planJobs } from "../../bench/calibrate/plan.js";

/** P(X ≤ k) for X ~ Binomial(m, p), summed from the pmf in log space. */
function binomialCdf(k: number, m: number, p: number): number {
  let logChoose = 0;
  let total = 0;
  for (let x = 0; x <= k; x++) {
    if (x > 0) logChoose += Math.log((m - x + 1) / x);
    total += Math.exp(logChoose + x * Math.log(p) + (m - x) * Math.log(1 - p));
  }
  return total;
}

describe("calibration plan: channels per cell", () => {
  it("leader cells: 200 up to n = 20, 80 at n = 60; other cells 40; 16 at 200 and 6 at 1,000 for all", () => {
    expect(defaultChannels(8, "leader")).toBe(200);
    expect(defaultChannels(20, "leader-low")).toBe(200);
    expect(defaultChannels(60, "leader")).toBe(80);
    expect(defaultChannels(60, "sparse")).toBe(40);
    expect(defaultChannels(8, "balanced")).toBe(40);
    expect(defaultChannels(200, "leader")).toBe(16);
    expect(defaultChannels(1000, "leader-low")).toBe(6);
  });

  it("the jobs follow the defaults per regime, and --channels overrides every cell", () => {
    const { plan } = parsePlan(["--n", "8", "--ratio", "5", "--regimes", "leader,cliques"], 2);
    const jobs = planJobs(plan);
    expect(jobs.filter((j) => j.regime === "leader")).toHaveLength(200);
    expect(jobs.filter((j) => j.regime === "cliques")).toHaveLength(40);
    const fixed = parsePlan(
      ["--n", "8", "--ratio", "5", "--regimes", "leader", "--channels", "7"],
      2,
    );
    expect(planJobs(fixed.plan)).toHaveLength(7);
  });

  it("a 90% leader interval shows < 85% by chance in 10% / 5% / 1% of cells with 40 / 80 / 200 channels", () => {
    // < 85% of m channels means at most ceil(0.85 m) − 1 hits.
    expect(binomialCdf(33, 40, 0.9)).toBeCloseTo(0.0995, 3);
    expect(binomialCdf(67, 80, 0.9)).toBeCloseTo(0.0538, 3);
    expect(binomialCdf(169, 200, 0.9)).toBeCloseTo(0.0095, 3);
  });
});
