/**
 * @module counts
 * The hand-off from `attention/` to `influence/`: plain typed arrays, no graph or matrix library
 * types. Rows and columns index `members`, which is sorted.
 */

/** C: summed (decayed) signal weights among active members in compressed sparse rows. */
export interface CountMatrix {
  /** Active member ids, sorted ascending; index = row = column. */
  readonly members: readonly string[];
  /** Length n + 1; row i occupies [rowPtr[i], rowPtr[i+1]). */
  readonly rowPtr: Int32Array;
  /** Column of each stored entry; ascending within a row; never the diagonal. */
  readonly colIdx: Int32Array;
  /** C_ij > 0 for each stored entry. */
  readonly values: Float64Array;
  /**
   * Kish factor k_i = Σw/Σw² of row i's signal weights (DESIGN.md §4.3): the effective counts are
   * Ĉ_ij = k_i·C_ij. Absent: 1 for every row (whole counts).
   */
  readonly kish?: Float64Array;
}

/** A partition of member indices, e.g. closed groups or clusters. */
export type IndexGroups = readonly (readonly number[])[];

export interface AttentionInput {
  readonly counts: CountMatrix;
  /** Signals counted, before decay. */
  readonly signals: number;
  /**
   * Closed groups of the β = 0 view (support of C plus even rows for members with no outgoing
   * signal): strongly connected components with no outgoing edge, each sorted, sorted by first index.
   */
  readonly closedGroups: IndexGroups;
  /** Consent level at `until` of each active member ("counted" or "named"). */
  readonly named: readonly boolean[];
  /** Group label at `until` for each active member, or null. */
  readonly labels: readonly (string | null)[];
  /**
   * Member → prior group (DESIGN.md §4.4): seeded Louvain clusters of C + Cᵀ when their modularity
   * is at least 0.3, else 0 for everyone. Each row's prior follows the attention its group gives.
   * Absent: one group.
   */
  readonly priorGroups?: Int32Array;
  /** Louvain clusters on C + Cᵀ when requested and no labels exist; else null. */
  readonly clusters: { readonly groups: IndexGroups; readonly modularity: number } | null;
}
