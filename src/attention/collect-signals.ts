/**
 * @module collect-signals
 * Turns a `LedgerSnapshot` into the signals of one analysis (docs/event-semantics.md rules 7–9,
 * DESIGN.md §4 steps 1–3): every stored, undeleted message in the window (until − W, until] whose
 * author still consents at `until` yields a reply signal to its parent's author and one mention
 * signal per mentioned member, each still consenting at `until`, weighted by exponential decay
 * 0.5^(age/H) (the half-life definition, common practice). One pass over messages and signals,
 * with consent looked up once per member.
 */
import { PlumblineError } from "../domain/errors.js";
import type { LedgerSnapshot } from "../domain/ledger.js";
import { DAY_MS } from "../domain/settings.js";
import { ConsentTimeline, compareIds, GroupTimeline, isConsenting } from "./timeline.js";

export type SignalKind = "reply" | "mention";

/** One counted act of attention, from `from` to `to`, already decayed to `until`. */
export interface Signal {
  readonly from: string;
  readonly to: string;
  readonly kind: SignalKind;
  /** Base weight (`replyWeight` or `mentionWeight`) times 0.5^(age/halfLife). */
  readonly weight: number;
  /** Epoch ms of the message that carried the signal. */
  readonly at: number;
}

export interface SignalSet {
  /** Signals in ledger message order; per message the reply first, then mentions ascending. */
  readonly signals: readonly Signal[];
  /** Number of signals, before decay (DESIGN.md §5 `signals`). */
  readonly count: number;
  /**
   * Messages in the window, by a member consenting at `until`, that were broadcasts (more than
   * 50 members mentioned: only their reply signal counts, DESIGN.md §4.2).
   */
  readonly broadcasts: number;
  /** Active members (rule 8), sorted ascending. */
  readonly members: readonly string[];
  /** Per active member: consent at `until` is `named`. */
  readonly named: readonly boolean[];
  /** Per active member: group label at `until` (rule 9), or null. */
  readonly labels: readonly (string | null)[];
}

export interface SignalParams {
  /** End of the window, epoch ms (inclusive). */
  readonly until: number;
  /** Window length in days (> 0); the window is (until − windowDays, until]. */
  readonly windowDays: number;
  /** Half-life in days (≥ 0); 0 means no decay. */
  readonly halfLifeDays: number;
  readonly replyWeight: number;
  readonly mentionWeight: number;
}

/**
 * Collects the signals of `snapshot` at `params.until` in O(messages + signals + consent changes).
 * A kind whose weight is 0 yields no signals at all (it is neither counted nor makes anyone active).
 */
export function collectSignals(snapshot: LedgerSnapshot, params: SignalParams): SignalSet {
  checkParams(params);
  const { until, replyWeight, mentionWeight } = params;
  const from = until - params.windowDays * DAY_MS;
  const halfLifeMs = params.halfLifeDays * DAY_MS;

  const timeline = new ConsentTimeline(snapshot.consent);
  const consentNow = new Map<string, boolean>();
  const consenting = (member: string): boolean => {
    let known = consentNow.get(member);
    if (known === undefined) {
      known = isConsenting(timeline.levelAt(member, until));
      consentNow.set(member, known);
    }
    return known;
  };

  const signals: Signal[] = [];
  const active = new Set<string>();
  let broadcasts = 0;
  for (const message of snapshot.messages) {
    if (message.deleted || message.at <= from || message.at > until) continue;
    if (!consenting(message.author)) continue;
    active.add(message.author);
    if (message.broadcast === true) broadcasts++;
    const decay = halfLifeMs === 0 ? 1 : 0.5 ** ((until - message.at) / halfLifeMs);
    const push = (to: string, kind: SignalKind, base: number): void => {
      signals.push({ from: message.author, to, kind, weight: base * decay, at: message.at });
      active.add(to);
    };
    const parent = message.parentAuthor;
    if (replyWeight > 0 && parent !== null && parent !== message.author && consenting(parent)) {
      push(parent, "reply", replyWeight);
    }
    if (mentionWeight > 0) {
      for (const mentioned of message.mentions) {
        if (mentioned !== message.author && consenting(mentioned)) {
          push(mentioned, "mention", mentionWeight);
        }
      }
    }
  }

  const members = [...active].sort(compareIds);
  const groups = new GroupTimeline(snapshot.groups);
  return {
    signals,
    count: signals.length,
    broadcasts,
    members,
    named: members.map((member) => timeline.levelAt(member, until) === "named"),
    labels: members.map((member) => groups.labelAt(member, until)),
  };
}

function checkParams(params: SignalParams): void {
  const problems: string[] = [];
  if (!Number.isFinite(params.until)) problems.push("until must be a time");
  if (!(Number.isFinite(params.windowDays) && params.windowDays > 0)) {
    problems.push(`window must be a positive number of days (got ${params.windowDays})`);
  }
  if (!(Number.isFinite(params.halfLifeDays) && params.halfLifeDays >= 0)) {
    problems.push(`half-life must be 0 (no decay) or a positive number of days`);
  }
  for (const key of ["replyWeight", "mentionWeight"] as const) {
    if (!(Number.isFinite(params[key]) && params[key] >= 0)) {
      problems.push(`${key} must be a number ≥ 0 (got ${params[key]})`);
    }
  }
  if (problems.length > 0) {
    throw new PlumblineError(
      "SETTING_BAD_VALUE",
      `Bad analysis settings: ${problems.join("; ")}.`,
      {
        hint: "Fix the listed settings and run the analysis again.",
      },
    );
  }
}
