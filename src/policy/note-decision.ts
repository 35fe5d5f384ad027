/**
 * @module note-decision
 * Applies the balance-note policy (`evaluateBalanceNote`) to a channel's stored state. A state
 * change that needs no post (the line re-arming) is written at once; the state that follows a note
 * is written only by `commit()`, which the caller runs after the note was posted, so a failed post
 * leaves the line armed.
 */
import type { NotesDestination } from "../domain/channel-settings.js";
import type { AnalysisReport } from "../domain/report.js";
import type { Store } from "../ports/store.js";
import {
  type BalanceNoteReason,
  type BalanceNoteState,
  evaluateBalanceNote,
  parseBalanceNoteState,
} from "./balance-note.js";

/** The channel state kind that holds `BalanceNoteState`. */
export const BALANCE_NOTE_STATE_KIND = "balance-note";

export interface NoteDecision {
  /** True when a note is due and should be posted now. */
  readonly post: boolean;
  readonly reason: BalanceNoteReason;
  /** Where it goes when `post`; null otherwise. */
  readonly audience: "channel" | "facilitators" | null;
  /** The member whose share crossed the line (report id), when `post`; for the claim row only. */
  readonly member: string | null;
  /** The state stored before this decision (null: none yet). */
  readonly previous: BalanceNoteState | null;
  /** The state `commit()` writes (or that was already written when not `post`). */
  readonly next: BalanceNoteState;
  /** Writes `next` after a successful post; does nothing when `post` is false. */
  commit(): Promise<void>;
}

/** Reads the channel's balance-note state, applies the policy and says whether to post. */
export async function noteDecision(
  store: Store,
  channel: string,
  report: AnalysisReport,
  now: number,
  notes: NotesDestination,
): Promise<NoteDecision> {
  const previous = parseBalanceNoteState(
    await store.readChannelState(channel, BALANCE_NOTE_STATE_KIND),
  );
  const verdict = evaluateBalanceNote({ report, state: previous, now, notes });
  const write = () => store.writeChannelState(channel, BALANCE_NOTE_STATE_KIND, verdict.next);
  if (!verdict.due) {
    if (previous !== null && !sameState(previous, verdict.next)) await write();
    return {
      post: false,
      reason: verdict.reason,
      audience: null,
      member: null,
      previous,
      next: verdict.next,
      commit: async () => {},
    };
  }
  return {
    post: true,
    reason: verdict.reason,
    audience: verdict.audience,
    member: report.line?.member ?? null,
    previous,
    next: verdict.next,
    commit: write,
  };
}

function sameState(a: BalanceNoteState, b: BalanceNoteState): boolean {
  return a.armed === b.armed && a.lastNoteAt === b.lastNoteAt;
}
