/**
 * @module closed-groups
 * Closed groups of the β = 0 view (DESIGN.md §4 step 8): the graph has an edge i→j for every
 * C_ij > 0, and a member with no outgoing signal attends evenly to everyone else. Its strongly
 * connected components (Tarjan 1972, "Depth-first search and linear graph algorithms", SIAM J.
 * Comput. 1:146–160; an explicit-stack version in strongly-connected.ts, cross-checked against
 * graphology-components in the tests) that no edge leaves are the closed
 * classes of the chain (Seneta 2006, "Non-negative Matrices and Markov Chains", ch. 1). The even
 * rows are never materialised: a silent member reaches everyone in one step, so a closed group
 * containing one must be everyone, and everyone is a closed group exactly when no closed component
 * of C alone avoids the silent members. The period of a class is the gcd of level(u) + 1 − level(v)
 * over its edges with breadth-first levels (Denardo 1977, "Periods of connected networks and powers
 * of nonnegative matrices", Math. Oper. Res. 2:20–24). Cost O(n + nonzeros). (The library's
 * recursive search overflows the call stack on attention paths of ~10⁴ members and, working on a
 * graphology graph, was 25× slower at 2,000 members, so it serves only as the tests' reference.)
 */
import type { CountMatrix, IndexGroups } from "../domain/counts.js";
import { stronglyConnectedIndices } from "./strongly-connected.js";

/**
 * Closed groups of the β = 0 view of `counts`: each group's member indices ascending, groups
 * ordered by their first index. One member alone is one group; no members give no groups.
 */
export function findClosedGroups(counts: CountMatrix): IndexGroups {
  const n = counts.members.length;
  if (n === 0) return [];
  const { rowPtr, colIdx } = counts;
  const component = new Int32Array(n);
  const components = stronglyConnectedIndices(counts).map((nodes, c) => {
    const members = [...nodes].sort((a, b) => a - b);
    for (const i of members) component[i] = c;
    return members;
  });

  let anySilent = false;
  const closed: number[][] = [];
  for (let c = 0; c < components.length; c++) {
    const members = components[c];
    let leaves = false;
    let silent = false;
    for (const i of members) {
      if (rowPtr[i] === rowPtr[i + 1]) silent = true;
      for (let k = rowPtr[i]; k < rowPtr[i + 1] && !leaves; k++) {
        if (component[colIdx[k]] !== c) leaves = true;
      }
    }
    anySilent ||= silent;
    // A component of C that holds a silent member is not closed in the β = 0 view (the even row
    // leaves it) unless it is everyone; that case is settled below.
    if (!leaves && !silent) closed.push(members);
  }
  if (closed.length === 0 && anySilent) {
    return [Array.from({ length: n }, (_, i) => i)];
  }
  return closed.sort((a, b) => a[0] - b[0]);
}

/** Whether member `i` has no outgoing signal (its β = 0 row is even over the others). */
function isSilent(counts: CountMatrix, i: number): boolean {
  return counts.rowPtr[i] === counts.rowPtr[i + 1];
}

/**
 * Period of a closed group (as returned by `findClosedGroups`) of the chain with self-weight 0:
 * 1 = aperiodic, d > 1 = the group's attention cycles with period d, so repeated averaging never
 * settles there without self-weight. Any self-weight σ > 0 makes every class aperiodic.
 * A group of one member has period 1 by convention (its row is all self-weight).
 */
export function closedGroupPeriod(counts: CountMatrix, group: readonly number[]): number {
  if (group.length <= 1) return 1;
  const n = counts.members.length;
  const { rowPtr, colIdx } = counts;
  const inGroup = new Uint8Array(n);
  for (const i of group) inGroup[i] = 1;
  const level = new Int32Array(n).fill(-1);
  const order: number[] = [group[0]];
  level[group[0]] = 0;
  let everyoneReached = false;
  for (let head = 0; head < order.length; head++) {
    const u = order[head];
    if (isSilent(counts, u)) {
      // Even row: u → every other member. Only a group of everyone can hold a silent member.
      if (!everyoneReached) {
        everyoneReached = true;
        for (let v = 0; v < n; v++) {
          if (level[v] < 0) {
            level[v] = level[u] + 1;
            order.push(v);
          }
        }
      }
      continue;
    }
    for (let k = rowPtr[u]; k < rowPtr[u + 1]; k++) {
      const v = colIdx[k];
      if (inGroup[v] === 1 && level[v] < 0) {
        level[v] = level[u] + 1;
        order.push(v);
      }
    }
  }
  if (order.length !== group.length) {
    throw new Error("closedGroupPeriod: the given members are not one strongly connected group");
  }

  let maxLevel = 0;
  for (const u of group) maxLevel = Math.max(maxLevel, level[u]);
  const atLevel = new Int32Array(maxLevel + 1);
  for (const u of group) atLevel[level[u]]++;

  let period = 0;
  for (const u of group) {
    if (isSilent(counts, u)) {
      // Terms level(u) + 1 − ℓ for the levels ℓ of every other member. Levels fill 0..maxLevel,
      // so two adjacent usable levels (found within the first four) already force gcd 1.
      for (let l = 0; l <= maxLevel && period !== 1; l++) {
        if (l === level[u] && atLevel[l] === 1) continue;
        period = gcd(period, Math.abs(level[u] + 1 - l));
      }
    } else {
      for (let k = rowPtr[u]; k < rowPtr[u + 1]; k++) {
        const v = colIdx[k];
        if (inGroup[v] === 1) period = gcd(period, Math.abs(level[u] + 1 - level[v]));
      }
    }
    if (period === 1) return 1;
  }
  return period;
}

function gcd(a: number, b: number): number {
  let x = a;
  let y = b;
  while (y !== 0) {
    const t = x % y;
    x = y;
    y = t;
  }
  return x;
}
