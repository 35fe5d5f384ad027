/**
 * @module balance-note
 * When a balance note is due (DESIGN.md §1, §4 `threshold`/`confidence`): a note fires when some
 * member's posterior probability of a share at or above the line reaches `confidence` (the
 * report's `line.crossed`). After a note the line is disarmed; it re-arms only once the top share
 * has fallen below line − 0.05, and at most one note per channel goes out in any 7 days. This is
 * hysteresis with a refractory period, as in a thermostat's dead band (common practice): it keeps a
 * share hovering at the line from posting a note every hour. Pure: the state is a plain
 * JSON-serialisable object the caller stores as the channel's `balance-note` state.
 */
import type { NotesDestination } from "../domain/channel-settings.js";
import type { AnalysisReport } from "../domain/report.js";
import { DAY_MS } from "../domain/settings.js";

/** The share must fall this far below the line before another note may fire. */
export const REARM_MARGIN = 0.05;

/** At most one note per channel per this many milliseconds (7 days). */
export const NOTE_COOLDOWN_MS = 7 * DAY_MS;

/** The channel's `balance-note` state; plain JSON. */
export interface BalanceNoteState {
  readonly version: 1;
  /** True when a crossing may post a note (no note yet, or the share fell below line − 0.05). */
  readonly armed: boolean;
  /** Epoch ms of the last note posted, null if none. */
  readonly lastNoteAt: number | null;
}

export type BalanceNoteReason =
  | "crossed"
  | "notes-off"
  | "insufficient"
  | "below-line"
  | "waiting-to-rearm"
  | "cooldown";

export interface BalanceNoteVerdict {
  readonly due: boolean;
  readonly reason: BalanceNoteReason;
  /** Where the note goes when due; null when not due. */
  readonly audience: "channel" | "facilitators" | null;
  /** The state to store: after a posted note when `due`, else now (re-arming is kept either way). */
  readonly next: BalanceNoteState;
}

export const INITIAL_BALANCE_NOTE_STATE: BalanceNoteState = Object.freeze({
  version: 1,
  armed: true,
  lastNoteAt: null,
});

/** Reads a stored state; anything unrecognised counts as none (a fresh, armed line). */
export function parseBalanceNoteState(value: unknown): BalanceNoteState | null {
  if (typeof value !== "object" || value === null) return null;
  const v = value as Record<string, unknown>;
  if (v.version !== 1 || typeof v.armed !== "boolean") return null;
  const last = v.lastNoteAt;
  if (last !== null && (typeof last !== "number" || !Number.isFinite(last))) return null;
  return { version: 1, armed: v.armed, lastNoteAt: last };
}

/** Decides whether a balance note is due now and what state follows (see the module header). */
export function evaluateBalanceNote(args: {
  readonly report: AnalysisReport;
  readonly state: BalanceNoteState | null;
  readonly now: number;
  readonly notes: NotesDestination;
}): BalanceNoteVerdict {
  const { report, now, notes } = args;
  const state = args.state ?? INITIAL_BALANCE_NOTE_STATE;
  const line = report.line;
  const top = report.top;
  if (report.status !== "ok" || !report.sufficient || line === null || top === null) {
    return notDue("insufficient", state);
  }
  const rearm = !state.armed && top.share < line.threshold - REARM_MARGIN;
  const current: BalanceNoteState = rearm ? { ...state, armed: true } : state;
  if (notes === "off") return notDue("notes-off", current);
  if (!line.crossed) return notDue("below-line", current);
  if (!current.armed) return notDue("waiting-to-rearm", current);
  if (current.lastNoteAt !== null && now - current.lastNoteAt < NOTE_COOLDOWN_MS) {
    return notDue("cooldown", current);
  }
  return {
    due: true,
    reason: "crossed",
    audience: notes,
    next: { version: 1, armed: false, lastNoteAt: now },
  };
}

function notDue(reason: BalanceNoteReason, next: BalanceNoteState): BalanceNoteVerdict {
  return { due: false, reason, audience: null, next };
}
