/**
 * @module ledger-builders
 * Small builders for hand-made `ChatEvent`s in tests: each takes overrides on top of defaults
 * (channel "c1", time T0). Times are epoch ms; `day(k)` is T0 plus k days.
 */
import type {
  ConsentEvent,
  ConsentLevel,
  DeleteEvent,
  EditEvent,
  GroupEvent,
  MessageEvent,
  UndeleteEvent,
} from "../../src/domain/events.js";
import { DAY_MS } from "../../src/domain/settings.js";

/** 2026-11-02T09:00:00Z. */
export const T0 = Date.UTC(2026, 10, 2, 9, 0, 0);

/** T0 plus `k` days (fractions allowed). */
export function day(k: number): number {
  return T0 + k * DAY_MS;
}

export function makeConsent(
  member: string,
  level: ConsentLevel,
  overrides: Partial<ConsentEvent> = {},
): ConsentEvent {
  return { type: "consent", at: T0, channel: "c1", member, level, ...overrides };
}

/** Consent events at `at` for every member listed. */
export function consentAll(
  members: readonly string[],
  level: ConsentLevel = "counted",
  at = T0,
): ConsentEvent[] {
  return members.map((member) => makeConsent(member, level, { at }));
}

export function makeMessage(
  overrides: Partial<MessageEvent> & { id: string; author: string },
): MessageEvent {
  return { type: "message", at: T0, channel: "c1", ...overrides };
}

export function makeEdit(id: string, mentions: readonly string[], at = T0): EditEvent {
  return { type: "edit", at, channel: "c1", id, mentions };
}

export function makeDelete(id: string, at = T0): DeleteEvent {
  return { type: "delete", at, channel: "c1", id };
}

export function makeUndelete(id: string, at = T0): UndeleteEvent {
  return { type: "undelete", at, channel: "c1", id };
}

export function makeGroup(member: string, group: string | null, at = T0): GroupEvent {
  return { type: "group", at, channel: "c1", member, group };
}
