import { describe, expect, it } from "vitest";
import { progressLine } from "../../src/analysis/progress-line.js";

describe("progress line", () => {
  it("stays silent for 2 s, then writes at most one line a second, and the last draw", () => {
    let clock = 0;
    const lines: string[] = [];
    const report = progressLine({ now: () => clock, write: (l) => lines.push(l) });
    for (let done = 1; done <= 400; done++) {
      clock += 10; // 10 ms a draw: 4 s in all
      report(done, 400);
    }
    expect(lines[0]).toBe("plumbline: analysing, 2.0 s, draws 200 of 400\n");
    // 2.0 and 3.0 s, then the last draw at 4.0 s.
    expect(lines.slice(1)).toEqual([
      "plumbline: analysing, 3.0 s, draws 300 of 400\n",
      "plumbline: analysing, 4.0 s, draws 400 of 400\n",
    ]);
  });

  it("writes nothing for an analysis under 2 s", () => {
    let clock = 0;
    const lines: string[] = [];
    const report = progressLine({ now: () => clock, write: (l) => lines.push(l) });
    for (let done = 1; done <= 100; done++) {
      clock += 19;
      report(done, 100);
    }
    expect(lines).toEqual([]);
  });
});
