/**
 * @module nearest-match
 * "Did you mean `check`?": the edit distance of Damerau (1964, "A technique for computer detection
 * and correction of spelling errors", Communications of the ACM 7(3):171–176), counting one
 * insertion, deletion, substitution or swap of two adjacent letters as one error each — the four
 * single errors Damerau found behind most misspellings. Computed as the optimal string alignment
 * distance (the common dynamic programme that allows each swap once and edits no letter twice), the
 * usual reading of "Damerau–Levenshtein" in spelling checkers (common practice).
 */

/** The Damerau (optimal string alignment) distance between two words, case-insensitive. */
export function editDistance(a: string, b: string): number {
  const s = a.toLowerCase();
  const t = b.toLowerCase();
  const rows = s.length + 1;
  const cols = t.length + 1;
  const d: number[][] = Array.from({ length: rows }, (_, i) =>
    Array.from({ length: cols }, (_, j) => (i === 0 ? j : j === 0 ? i : 0)),
  );
  for (let i = 1; i < rows; i++) {
    for (let j = 1; j < cols; j++) {
      const cost = s[i - 1] === t[j - 1] ? 0 : 1;
      let best = Math.min(d[i - 1][j] + 1, d[i][j - 1] + 1, d[i - 1][j - 1] + cost);
      if (i > 1 && j > 1 && s[i - 1] === t[j - 2] && s[i - 2] === t[j - 1]) {
        best = Math.min(best, d[i - 2][j - 2] + 1);
      }
      d[i][j] = best;
    }
  }
  return d[s.length][t.length];
}

/** Farthest a word may be from a known one and still be offered as "did you mean". */
export const MAX_SUGGESTION_DISTANCE = 2;

/**
 * The known word nearest to `word` within `MAX_SUGGESTION_DISTANCE`, or null. Ties go to the
 * earlier candidate, so the order of `known` decides (put the commonest first). A word of one or
 * two letters gets a suggestion only at distance 1, so "xy" is not read as "me".
 */
export function nearestMatch(word: string, known: readonly string[]): string | null {
  const limit = word.length <= 2 ? 1 : MAX_SUGGESTION_DISTANCE;
  let best: string | null = null;
  let bestDistance = limit + 1;
  for (const candidate of known) {
    const distance = editDistance(word, candidate);
    if (distance < bestDistance) {
      best = candidate;
      bestDistance = distance;
    }
  }
  return best;
}
