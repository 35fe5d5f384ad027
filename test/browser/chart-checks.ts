/**
 * In-page measurements for the browser tests: every visible chart's text boxes as Chromium lays
 * them out (`getBoundingClientRect`), with the rendered font size (computed size × the SVG's scale
 * from its viewBox), and the pure checks on them: no two boxes overlap, none is under 10 px, all lie
 * inside their chart. The 10 px floor is the readability rule for phone screens (common
 * practice for chart text; WCAG sets no minimum size).
 */
import { readFileSync } from "node:fs";
import { createRequire } from "node:module";
import type { Page } from "playwright-core";

export interface TextBox {
  readonly content: string;
  readonly x: number;
  readonly y: number;
  readonly width: number;
  readonly height: number;
  /** Font size in CSS px as rendered (after the SVG's scaling). */
  readonly font: number;
}

export interface ChartBoxes {
  readonly kind: string;
  readonly box: { x: number; y: number; width: number; height: number };
  readonly texts: readonly TextBox[];
}

/** Runs in the page (a string, since the tests are typed without the DOM library). */
const MEASURE = `(() => {
  const out = [];
  for (const svg of document.querySelectorAll("svg[data-chart]")) {
    if (!svg.checkVisibility()) continue;
    const r = svg.getBoundingClientRect();
    const scale = r.width / svg.viewBox.baseVal.width;
    const texts = [...svg.querySelectorAll("text")]
      .filter((t) => t.textContent.trim() !== "")
      .map((t) => {
        const b = t.getBoundingClientRect();
        return { content: t.textContent, x: b.x, y: b.y, width: b.width, height: b.height,
          font: parseFloat(getComputedStyle(t).fontSize) * scale };
      });
    out.push({ kind: svg.dataset.chart, box: { x: r.x, y: r.y, width: r.width, height: r.height }, texts });
  }
  return out;
})()`;

export async function measureCharts(page: Page): Promise<ChartBoxes[]> {
  return (await page.evaluate(MEASURE)) as ChartBoxes[];
}

/** Pairs of text boxes that overlap by more than `tolerance` px in both directions. */
export function overlaps(texts: readonly TextBox[], tolerance = 0.5): string[] {
  const found: string[] = [];
  for (let i = 0; i < texts.length; i++) {
    for (let j = i + 1; j < texts.length; j++) {
      const a = texts[i];
      const b = texts[j];
      const dx = Math.min(a.x + a.width, b.x + b.width) - Math.max(a.x, b.x);
      const dy = Math.min(a.y + a.height, b.y + b.height) - Math.max(a.y, b.y);
      if (dx > tolerance && dy > tolerance) found.push(`"${a.content}" × "${b.content}"`);
    }
  }
  return found;
}

/** Text whose box is under `minPx` tall or whose rendered font size is under `minPx`. */
export function tooSmall(texts: readonly TextBox[], minPx = 10): string[] {
  return texts
    .filter((t) => t.height < minPx || t.font < minPx - 1e-6)
    .map((t) => `"${t.content}" ${t.font.toFixed(1)} px (box ${t.height.toFixed(1)} px)`);
}

/** Text boxes that reach outside their chart (clipped text), with 0.5 px of rounding. */
export function outside(chart: ChartBoxes): string[] {
  const b = chart.box;
  return chart.texts
    .filter(
      (t) =>
        t.x < b.x - 0.5 ||
        t.y < b.y - 0.5 ||
        t.x + t.width > b.x + b.width + 0.5 ||
        t.y + t.height > b.y + b.height + 0.5,
    )
    .map((t) => `"${t.content}"`);
}

const AXE_SOURCE = readFileSync(
  createRequire(import.meta.url).resolve("axe-core/axe.min.js"),
  "utf8",
);

export interface AxeViolation {
  readonly id: string;
  readonly impact: string | null;
  readonly help: string;
  readonly targets: readonly string[];
}

/**
 * Runs axe-core (Deque, axe-core 4.x, the rules of WCAG 2.0–2.2 A/AA plus best practices) on the
 * page with every `<details>` opened, so the charts' tables are checked too; returns the serious
 * and critical violations. The page's context must bypass its CSP (the page forbids scripts).
 */
export async function seriousAxeViolations(page: Page): Promise<AxeViolation[]> {
  await page.evaluate(AXE_SOURCE);
  await page.evaluate(`document.querySelectorAll("details").forEach((d) => { d.open = true; })`);
  const result = (await page.evaluate(
    `axe.run(document).then((r) => ({ passes: r.passes.length, violations: r.violations.map((v) => ({ id: v.id, impact: v.impact, help: v.help, targets: v.nodes.map((n) => String(n.target)) })) }))`,
  )) as { passes: number; violations: AxeViolation[] };
  // A run that passed no rule at all did not really look at the page.
  if (result.passes < 10) throw new Error(`axe-core passed only ${result.passes} rules`);
  return result.violations.filter((v) => v.impact === "serious" || v.impact === "critical");
}
