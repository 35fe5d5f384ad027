/**
 * @module settings
 * The model's parameters (DESIGN.md §4) with their defaults. Every surface computes with one
 * `AnalysisSettings`; the CLI flags and channel settings only override fields of it.
 */

export const DAY_MS = 86_400_000;

export interface AnalysisSettings {
  /** Window length in days, ending at `until`. */
  readonly windowDays: number;
  /** Decay half-life in days; 0 = no decay. */
  readonly halfLifeDays: number;
  readonly replyWeight: number;
  readonly mentionWeight: number;
  /**
   * Prior strength α in signals (DESIGN.md §4.4): "auto" learns it per row from the data (the
   * default, chosen by calibration); a number ≥ 0 fixes it (0 = no prior).
   */
  readonly background: number | "auto";
  /** Self-weight σ in [0, 1): changes the speed of averaging, never the shares. */
  readonly selfWeight: number;
  /** Posterior draws K (0 = no intervals). */
  readonly samples: number;
  /** Central interval mass, e.g. 0.9. */
  readonly interval: number;
  /** Seed for the draws; null = derived from channel and `until`. */
  readonly seed: number | null;
  /** The line: a share in (0, 1), or "auto" = max(0.30, 2/n). */
  readonly threshold: number | "auto";
  /** A note is due when P(share ≥ line) ≥ confidence. */
  readonly confidence: number;
  /** Minimum active members for any figure (never below 3). */
  readonly minMembers: number;
  /** Minimum signals (before decay) for any figure. */
  readonly minSignals: number;
  /** Louvain clusters when no group labels exist. */
  readonly clusters: boolean;
}

export const DEFAULT_SETTINGS: AnalysisSettings = Object.freeze({
  windowDays: 28,
  halfLifeDays: 14,
  replyWeight: 1,
  mentionWeight: 1,
  background: "auto",
  selfWeight: 0.5,
  samples: 400,
  interval: 0.9,
  seed: null,
  threshold: "auto",
  confidence: 0.8,
  minMembers: 5,
  minSignals: 20,
  clusters: true,
});

/** The line for n active members: a fixed share, or max(0.30, 2/n) when "auto". */
export function resolveThreshold(threshold: number | "auto", n: number): number {
  if (threshold !== "auto") return threshold;
  return n > 0 ? Math.max(0.3, 2 / n) : 0.3;
}
