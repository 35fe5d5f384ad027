/**
 * Zachary's karate club (Zachary 1977, "An information flow model for conflict and fission in
 * small groups", J. Anthropological Research 33:452–473), as shipped by graphology-generators:
 * 34 members, 78 undirected ties. Members are named k00…k33.
 */
import { UndirectedGraph } from "graphology";
import karateModule from "graphology-generators/social/karate-club.js";

/** CommonJS packages: Node's ESM loader hands over `module.exports`; the typings say `.default`. */
function interop<T>(module: { default: T }): T {
  return (module as unknown as { default?: T }).default ?? (module as unknown as T);
}

export function karateTies(): [string, string][] {
  const karateClub = interop(karateModule);
  const g = karateClub(UndirectedGraph);
  const name = (k: string) => `k${k.padStart(2, "0")}`;
  return g.mapEdges(
    (_e: string, _a: unknown, s: string, t: string) => [name(s), name(t)] as [string, string],
  );
}
