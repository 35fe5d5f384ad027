/**
 * @module label-placer
 * Greedy label placement: labels are taken in priority order and each gets the first of its
 * candidate positions that stays inside the chart and overlaps neither a fixed mark (an obstacle)
 * nor a label placed before it; a label with no free position is dropped, and the chart keeps its
 * text in the mark's `<title>` and in the table beside the chart. Greedy candidate placement is
 * common practice for point labels (Christensen, Marks & Shieber 1995, "An empirical study of
 * algorithms for point-feature label placement", ACM Transactions on Graphics 14(3):203–232,
 * compare greedy with better but costlier searches; for a few dozen labels greedy is enough).
 */
import type { Box } from "./text-metrics.js";

/** True when the two boxes overlap, or come closer than `gap`. */
export function boxesOverlap(a: Box, b: Box, gap = 0): boolean {
  return (
    a.x < b.x + b.width + gap &&
    b.x < a.x + a.width + gap &&
    a.y < b.y + b.height + gap &&
    b.y < a.y + a.height + gap
  );
}

/** True when `inner` lies wholly inside `outer`. */
export function boxInside(inner: Box, outer: Box): boolean {
  return (
    inner.x >= outer.x &&
    inner.y >= outer.y &&
    inner.x + inner.width <= outer.x + outer.width &&
    inner.y + inner.height <= outer.y + outer.height
  );
}

/** One possible position of a label: the boxes it covers (one per text line) and what to draw. */
export interface LabelCandidate<T> {
  readonly boxes: readonly Box[];
  readonly value: T;
}

/**
 * Places labels greedily, in the order given (most important first). Returns, for each label, the
 * chosen candidate's value, or null when every candidate collides or leaves `bounds`. Placed labels
 * become obstacles for the ones after them, with `gap` px of air between any two boxes.
 */
export function placeLabels<T>(args: {
  labels: readonly (readonly LabelCandidate<T>[])[];
  obstacles?: readonly Box[];
  bounds: Box;
  gap?: number;
}): (T | null)[] {
  const gap = args.gap ?? 1;
  const taken: Box[] = [...(args.obstacles ?? [])];
  return args.labels.map((candidates) => {
    for (const candidate of candidates) {
      const fits = candidate.boxes.every(
        (box) => boxInside(box, args.bounds) && taken.every((t) => !boxesOverlap(box, t, gap)),
      );
      if (fits) {
        taken.push(...candidate.boxes);
        return candidate.value;
      }
    }
    return null;
  });
}

/** The box around a circle, for circles that labels must not cover. */
export function circleBox(cx: number, cy: number, r: number): Box {
  return { x: cx - r, y: cy - r, width: 2 * r, height: 2 * r };
}
