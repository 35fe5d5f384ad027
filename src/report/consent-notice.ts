/**
 * @module consent-notice
 * The notice a member reads when they opt in (DESIGN.md §7): what is counted, what is never
 * stored, who sees what, how to leave, and that the figures are a rough proxy never to be used for
 * HR decisions. Its version is logged with every consent, so change the version with the text.
 */
import type { Block } from "../domain/blocks.js";

/** Version of the notice text below; recorded with each `join`. */
export const CONSENT_NOTICE_VERSION = "2026-12-a";

/** The notice's paragraphs, in reading order. */
export const CONSENT_NOTICE = [
  "What is counted: when you reply to or mention another member who has also opted in, plumbline counts it once, from you to them, with its time. Replies and mentions involving anyone who has not opted in are not counted.",
  "What is never stored: the text of any message, links, files or reactions. Your member id is stored only in a scrambled (keyed) form, unless you choose to be named.",
  "Who can see what: you can always see your own figures privately (/influence me). Anyone in the channel can ask for the channel's figures privately. Members who join as `counted` are never named to anyone else; members who join as `named` may be named to the channel's facilitators, and to the whole channel if a facilitator turns names on.",
  "What `counted` protects you from: no message names you, and none lets anyone work out your share to within 5 points: figures about fewer than the channel's minimum number of members (the minmembers setting, at least 3) are hidden, and so are named members' shares when they would give yours away by subtraction.",
  "What it cannot protect you from: in a very small channel, the other members can each see their own share, and together they can work out yours from what is left. Everyone can also see that the channel has, say, 5 active members. If that matters to you, wait until more members have joined, or do not join.",
  "How to leave: /influence leave stops the counting and deletes everything stored about you in this channel, at once.",
  "What the figures are: a rough proxy for who pays attention to whom, not a measure of anyone's worth or work. They must never be used for performance reviews or any HR decision.",
] as const;

/**
 * The notice as neutral blocks, with its version. `title` is its heading: the notice is shown in
 * the answer to `join`, after the join is recorded, so the caller says what has just happened.
 */
export function consentNoticeBlocks(title = "What plumbline counts"): Block[] {
  return [
    { kind: "heading", text: title },
    ...CONSENT_NOTICE.map((text): Block => ({ kind: "note", text })),
    { kind: "note", text: `(Consent notice version ${CONSENT_NOTICE_VERSION}.)` },
  ];
}
