/**
 * @module report
 * The `AnalysisReport` of DESIGN.md §5: the CLI's `--json` output and the only source every
 * surface renders. Numbers are rounded to 6 decimals so the JSON is stable and readable.
 * Member ids are the ids the analysis saw; surfaces apply the naming rules (`named`) when rendering.
 */

export const REPORT_VERSION = 1;

export interface Interval {
  readonly value: number;
  readonly low: number;
  readonly high: number;
}

export interface ShareFigure {
  readonly member: string;
  readonly share: number;
  readonly low: number;
  readonly high: number;
  /** Share of posterior draws with this member's share at or above the line. */
  readonly pAbove: number;
}

export interface InfluenceEntry extends ShareFigure {
  /** Column sum of A: 1 = receives as much attention as it gives. */
  readonly attentionReceived: number;
  /** Consent `named` at `until`: surfaces may name this member if the channel allows. */
  readonly named: boolean;
}

export interface GroupFigure {
  readonly group: string;
  readonly members: number;
  readonly share: number;
  readonly low: number;
  readonly high: number;
  readonly headcountShare: number;
}

/** 2023 U.S. Merger Guidelines, Guideline 1: HHI above 1,800 is "highly concentrated". */
export type Concentration = "high" | "below-high";

/** "ok": figures given; "insufficient": too little data; "no-unique-shares": β = 0 and several closed groups. */
export type ReportStatus = "ok" | "insufficient" | "no-unique-shares";

export interface AnalysisReport {
  readonly version: typeof REPORT_VERSION;
  readonly channel: string;
  readonly window: {
    readonly from: string;
    readonly until: string;
    readonly days: number;
    readonly halfLifeDays: number;
  };
  readonly settings: {
    readonly replyWeight: number;
    readonly mentionWeight: number;
    /** The setting: "auto" or a fixed prior strength. */
    readonly background: number | "auto";
    /** Prior strength used, in signals: the median over rows (null when no figures). */
    readonly priorStrength: number | null;
    /** How the posterior is drawn: "exact" (every cell, n ≤ 64) or "pooled" (large n: sticks, and one pooled prior direction per group for rows with a strong prior). */
    readonly posterior: "exact" | "pooled";
    readonly selfWeight: number;
    readonly samples: number;
    readonly interval: number;
    readonly seed: number;
    readonly threshold: number;
    readonly thresholdMode: "auto" | "fixed";
    readonly confidence: number;
  };
  readonly status: ReportStatus;
  /** Active members n. */
  readonly members: number;
  /** Signals before decay. */
  readonly signals: number;
  /** Messages in the window that mentioned more than 50 members: their mentions are not counted. */
  readonly broadcasts: number;
  readonly sufficient: boolean;
  /** When not sufficient: how many more active members and signals are needed (0 = enough). */
  readonly needed: { readonly members: number; readonly signals: number } | null;
  readonly influence: readonly InfluenceEntry[] | null;
  readonly top: ShareFigure | null;
  readonly effectiveVoices: Interval | null;
  readonly balance: number | null;
  readonly hhi: number | null;
  readonly concentration: Concentration | null;
  readonly consensus: {
    readonly closedGroups: number;
    readonly reached: boolean;
    /** |λ2| of T. */
    readonly secondEigenvalue: number | null;
    /** ln 0.5 / ln |λ2| at the report's σ; JSON only, never shown in chat. Null when |λ2| is 0 or ≥ 1. */
    readonly roundsToHalve: number | null;
  } | null;
  readonly contributors: readonly { readonly member: string; readonly share: number }[] | null;
  /** Facilitator-labelled groups (unlabelled members are left out of every group). */
  readonly groups: readonly GroupFigure[] | null;
  /** Unnamed Louvain clusters, only when no labels exist and clustering is on. */
  readonly clusters: {
    readonly modularity: number;
    readonly groups: readonly GroupFigure[];
  } | null;
  readonly line: {
    readonly threshold: number;
    readonly crossed: boolean;
    readonly member: string | null;
    readonly probability: number;
  } | null;
}
