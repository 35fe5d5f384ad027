/**
 * @module blocks
 * Neutral message blocks: what the bot says, independent of any platform. The text renderer here
 * and the platform adapters each render the same blocks their own way.
 */

export interface FigureRow {
  readonly label: string;
  readonly value: string;
  readonly detail?: string;
}

export interface BarRow {
  readonly label: string;
  /** Point value in [0, 1]. */
  readonly value: number;
  readonly low: number;
  readonly high: number;
  /** Printed after the bar, e.g. "31% (24–38%)". */
  readonly text: string;
}

export type Block =
  | { readonly kind: "heading"; readonly text: string }
  | { readonly kind: "figures"; readonly rows: readonly FigureRow[] }
  | {
      readonly kind: "bars";
      readonly caption: string;
      readonly rows: readonly BarRow[];
      /** The line, drawn across the bars, if any. */
      readonly line: number | null;
    }
  | { readonly kind: "note"; readonly text: string }
  | { readonly kind: "cautions"; readonly text: string }
  | { readonly kind: "footer"; readonly text: string };
