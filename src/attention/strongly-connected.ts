/**
 * @module strongly-connected
 * Strongly connected components of the support of a CSR count matrix by Tarjan's algorithm
 * (Tarjan 1972, "Depth-first search and linear graph algorithms", SIAM J. Comput. 1:146–160),
 * written with an explicit stack so that depth is bounded by memory, not by the call stack.
 * graphology-components recurses once per step of a path and overflows on paths of some ten
 * thousand members; closed-groups falls back to this version then. O(n + nonzeros).
 */
import type { CountMatrix } from "../domain/counts.js";

/** Components of the directed graph i→j for each stored C_ij, as lists of member indices. */
export function stronglyConnectedIndices(counts: CountMatrix): number[][] {
  const n = counts.members.length;
  const { rowPtr, colIdx } = counts;
  const index = new Int32Array(n).fill(-1);
  const low = new Int32Array(n);
  const onStack = new Uint8Array(n);
  const stack: number[] = [];
  const callNode: number[] = [];
  const callEdge: number[] = [];
  const components: number[][] = [];
  let counter = 0;

  for (let root = 0; root < n; root++) {
    if (index[root] >= 0) continue;
    index[root] = low[root] = counter++;
    stack.push(root);
    onStack[root] = 1;
    callNode.push(root);
    callEdge.push(rowPtr[root]);
    while (callNode.length > 0) {
      const top = callNode.length - 1;
      const u = callNode[top];
      const k = callEdge[top];
      if (k < rowPtr[u + 1]) {
        callEdge[top] = k + 1;
        const v = colIdx[k];
        if (index[v] < 0) {
          index[v] = low[v] = counter++;
          stack.push(v);
          onStack[v] = 1;
          callNode.push(v);
          callEdge.push(rowPtr[v]);
        } else if (onStack[v] === 1 && index[v] < low[u]) {
          low[u] = index[v];
        }
        continue;
      }
      callNode.pop();
      callEdge.pop();
      if (callNode.length > 0) {
        const parent = callNode[callNode.length - 1];
        if (low[u] < low[parent]) low[parent] = low[u];
      }
      if (low[u] === index[u]) {
        const component: number[] = [];
        let w: number;
        do {
          w = stack.pop() as number;
          onStack[w] = 0;
          component.push(w);
        } while (w !== u);
        components.push(component);
      }
    }
  }
  return components;
}
