/**
 * Property (fast-check) through the real commands: random channels (members, consent mixes,
 * replies and mentions), random group labels set with `/influence group`, random `names` and
 * `minmembers` settings, and a random command by a random reader (`check`, `check post`,
 * `whatif cap`). For every answer, the attacker of reader-inference.ts recomputes what its reader
 * can infer; no unnamed member's share may be narrowed to ±5 points beyond the channel-wide
 * release (see property.test.ts for the definition).
 */
import fc from "fast-check";
import { describe, expect, it } from "vitest";
import { analyzeSnapshot } from "../../src/analysis/analyze-snapshot.js";
import { readChannelSettings } from "../../src/commands/channel-settings-store.js";
import { analysisSettingsFor } from "../../src/domain/channel-settings.js";
import { disclosureK } from "../../src/report/disclosure.js";
import { CHANNEL, DAY, HOUR, mentions, NAMES, runner, T0 } from "../commands/channel-fixture.js";
import { baselineWidths, inferredWidths, type Scenario } from "./reader-inference.js";

const BAND = 0.1;
const EPS = 1e-6;
const POOL = ["UANA", "UBO", "UCY", "UDEE", "UELI", "UFAY", "UGUS", "UHAL", "UIVY"];
const NOW = T0 + 20 * DAY;

const channel = fc.integer({ min: 4, max: 9 }).chain((n) =>
  fc.record({
    n: fc.constant(n),
    named: fc.array(fc.boolean(), { minLength: n, maxLength: n }),
    labels: fc.array(fc.constantFrom(null, "north", null, "north", "south"), {
      minLength: n,
      maxLength: n,
    }),
    // Weight of each ordered pair's mentions (0 = none).
    weights: fc.array(fc.integer({ min: 0, max: 6 }), { minLength: n * n, maxLength: n * n }),
    names: fc.boolean(),
    minMembers: fc.integer({ min: 3, max: 4 }),
    reader: fc.integer({ min: 0, max: n + 1 }),
    command: fc.constantFrom("check", "check post", "whatif cap 0.5"),
  }),
);

describe("no unnamed share is recoverable through the commands (property)", () => {
  it("holds for check, check post and whatif answers", async () => {
    let withFigures = 0;
    let withBars = 0;
    let withheld = 0;
    await fc.assert(
      fc.asyncProperty(channel, async (c) => {
        const members = POOL.slice(0, c.n);
        const r = await runner();
        try {
          for (const [i, m] of members.entries()) {
            await r.run(m, c.named[i] ? "join named" : "join", { now: T0 });
          }
          await r.run("UBOSS", `set minmembers ${c.minMembers}`, { now: T0 });
          if (c.names) await r.run("UBOSS", "set names on", { now: T0 });
          for (const [i, m] of members.entries()) {
            const label = c.labels[i];
            if (label !== null) await r.run("UBOSS", `group ${m} ${label}`, { now: T0 });
          }
          let k = 0;
          for (const [i, from] of members.entries()) {
            for (const [j, to] of members.entries()) {
              const times = i === j ? 0 : (c.weights[i * c.n + j] ?? 0) + (j === 0 ? 2 : 0);
              if (times > 0) await mentions(r.store, { from, to, times, at: T0 + DAY + k * HOUR });
              k++;
            }
          }
          // Readers: a member, someone outside (UZED), or a facilitator (UBOSS).
          const reader =
            c.command === "check post"
              ? "UBOSS"
              : c.reader < c.n
                ? members[c.reader]
                : c.reader === c.n
                  ? "UZED"
                  : "UBOSS";
          const answer = await r.run(reader, c.command, { now: NOW });
          const settings = await readChannelSettings(r.store, CHANNEL);
          const snapshot = await r.store.loadSnapshot(CHANNEL);
          const report = analyzeSnapshot(snapshot, analysisSettingsFor(settings), { until: NOW });
          if (!report.influence || !report.top) return;
          withFigures++;
          if (answer.message.blocks.some((b) => b.kind === "bars")) withBars++;
          if (answer.message.text.includes("Individual shares are withheld")) withheld++;
          const idOf = (platformId: string) => {
            const ids = [platformId, `~${r.store.memberKey(platformId)}`];
            return report.influence?.find((e) => ids.includes(e.member))?.member ?? null;
          };
          const groups = new Map<string, string[]>();
          members.forEach((m, i) => {
            const label = c.labels[i];
            const id = idOf(m);
            if (label !== null && id !== null)
              groups.set(label, [...(groups.get(label) ?? []), id]);
          });
          const posted = c.command === "check post";
          const namesOn = posted ? c.names : reader === "UBOSS" || c.names;
          const readers = posted ? [null, ...members] : [reader];
          const found: string[] = [];
          for (const who of readers) {
            const self = who === null ? null : idOf(who);
            const known = new Map<string, string[]>();
            for (const e of report.influence) {
              const labels: string[] = [];
              const platform = members.find((m) => idOf(m) === e.member) ?? e.member;
              if (namesOn && e.named) labels.push(NAMES[platform] ?? platform);
              if (e.member === self && !posted) labels.push(`you (${NAMES[platform] ?? platform})`);
              if (labels.length > 0) known.set(e.member, labels);
            }
            if (self !== null && !known.has(self)) known.set(self, []);
            const scenario: Scenario = {
              members: report.influence.map((e) => ({ id: e.member, share: e.share })),
              known,
              reader: self,
              groups,
            };
            const widths = inferredWidths([answer.message.blocks], scenario);
            const baseline = baselineWidths(scenario, disclosureK(c.minMembers), report.top.share);
            for (const [id, width] of widths) {
              if (known.has(id)) continue;
              if (width <= BAND + EPS && (baseline.get(id) ?? Infinity) > BAND + EPS) {
                found.push(`${c.command} read by ${who ?? "anyone"}: ${id} to ${width.toFixed(3)}`);
              }
            }
          }
          expect(found).toEqual([]);
        } finally {
          await r.store.close();
        }
      }),
      { numRuns: 60, seed: 20261202 },
    );
    // Not vacuous: most channels have figures; some answers show shares, some withhold them.
    expect(withFigures).toBeGreaterThan(45);
    expect(withBars).toBeGreaterThan(10);
    expect(withheld).toBeGreaterThan(0);
  }, 120_000);
});
