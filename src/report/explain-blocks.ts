/**
 * @module explain-blocks
 * The how to read (`/influence explain`): what is counted, the idea in plain words, every figure
 * once with a one-line example, why concentration matters, what the figures cannot tell, and the
 * full cautions. Written for a facilitator who does no maths. `/influence explain more` adds the
 * model by its technical names: DeGroot's repeated averaging (DeGroot 1974, "Reaching a
 * consensus", JASA 69:118–121), the attention matrix and its stationary vector, the two
 * assumptions, the posterior and the concentration index. The README's figures table carries
 * FIGURES word for word (test/report/wording.test.ts checks it).
 */

import type { Block } from "../domain/blocks.js";
import type { OutgoingMessage } from "../ports/chat-platform.js";
import { CAUTIONS_FULL } from "./cautions.js";
import { renderText } from "./render-text.js";

const COUNTED = [
  "Only members who opted in are counted, and only what passes between two of them: each time one replies to or mentions the other, that counts once as attention from the first to the second. Message text, links and files are never read or stored.",
  "Recent activity counts more than old activity: by default a reply from two weeks ago counts half as much as one from today. Only the last 28 days count, unless a facilitator changed that.",
];

const MODEL = [
  "The idea: in a discussion, people adjust their view toward the views of those they pay attention to. Picture every member repeatedly taking a weighted average of the views they listen to, weighted by how they spread their replies and mentions. After enough rounds the channel settles on one shared view. A member's influence share is how much of that shared view comes from their starting view. The shares add up to 100%.",
  "Someone who is answered and mentioned a lot by members who are themselves answered a lot gets a large share. Talking a lot does not by itself raise a share; being listened to does.",
  "Two assumptions fill in what the counts cannot see. The channel's habits: with few replies from someone, we assume they listen as the channel does (or as the part of the channel they talk with does), spreading their attention like the attention everyone gives. How strongly we assume it is learnt from the replies themselves; it keeps one stray reply from deciding a share and fades as a member's own replies and mentions add up, so in an active channel the counted signals, not this assumption, decide the shares. Self-weight: how much each member holds on to their own view in each round. It changes only how fast views settle, never the shares.",
];

/**
 * Every figure a message shows: its name, what it means, and a one-line example. The first six
 * are the terms of DESIGN.md §1 that users need; the README's figures table repeats each meaning
 * and example word for word.
 */
export const FIGURES: readonly (readonly [term: string, meaning: string, example: string])[] = [
  [
    "Influence share",
    "how much of the channel's shared view comes from this member, if everyone keeps listening to one another as they do now; the shares add up to 100%.",
    "with 10 members an even split is 10% each; a share of 35% means one member's view makes up about a third of the shared view.",
  ],
  [
    "Effective voices",
    "how many equally heard, independent opinions the channel's shared view is worth.",
    '"5.2 of 12" means twelve members took part, but their shared view is worth only about five evenly heard voices.',
  ],
  [
    "Balance",
    "effective voices divided by active members: 1.00 is perfectly even, lower is more lopsided.",
    "5.2 effective voices of 12 members is a balance of 0.43.",
  ],
  [
    "Line",
    "the share above which the bot posts a balance note: 30%, or twice an even share in small channels, unless a facilitator set another. A note needs a probability of at least 80% that a member is above it.",
    "with 5 members the line is 40%, so a member at 45% with probability 85% brings a note.",
  ],
  [
    "Digest",
    "the weekly post with these figures, on the channel's own day and time, and the change since the last one.",
    "every Monday at 09:00: effective voices 6.6 of 13, the largest share 32%, and 4.3 → 6.6 since last week.",
  ],
  [
    "Note",
    "the post when one member's share is above the line; it names nobody unless the channel's naming rules allow it, and it suggests a few things to try.",
    "one member's share is 37%, above the 30% line (probability 92%); the note suggests inviting quieter members to speak first.",
  ],
  [
    "Interval",
    "the range a figure is likely to lie in, given how little or much was counted: 9 out of 10 plausible values fall inside. Wide ranges mean little data; read the range, not just the middle.",
    '"32%, interval 29–36%" means the share is very likely between 29% and 36%.',
  ],
  [
    "Largest share",
    "the biggest single influence share, with its interval.",
    "the largest share is 45%, interval 43–47%.",
  ],
  [
    "Probability",
    'how sure the figures are that something holds, given what was counted. It is never shown as 100% or 0%: "over 99%" and "under 1%" are as far as counts can go.',
    '"above the 30% line, probability 88%" means about 9 chances in 10 that the share really is above the line.',
  ],
  [
    "Member 3",
    "the member with the 3rd largest share in that message, when they are not named: a place in the ranking, not a name, and it can change from one message to the next.",
    'a digest lists "rosa 37%, member 2 11%, kofi 9%": member 2 is whoever holds the second largest share and has not allowed their name.',
  ],
  [
    "Groups",
    "when a facilitator labels groups (for example departments or shifts), each group's share of influence beside its share of the members.",
    "a group holding 50% of influence with 25% of the members is heard twice its size.",
  ],
  [
    "Where the largest share comes from",
    "whose attention feeds the largest share, as parts that add up to 100%.",
    '"member 2 18%, sol 13%" means 18% of the largest share comes from the attention of member 2.',
  ],
];

const WHY = [
  "Why concentration matters: a group decides well when it pools what many members know independently. If most attention flows to one or two members, everyone's view drifts toward theirs, and the shared view is worth little more than those one or two opinions, however many people took part. Effective voices measures exactly this: the number of independent opinions the shared view is really worth.",
];

const LIMITS = [
  "What the figures cannot tell: counts of replies and mentions are a rough proxy for attention. People also listen in meetings, in private messages and by reading without replying. Silence is not agreement, and a member with a small share may still be the one everyone reads. The figures say nothing about whether anyone is right, and nothing about anyone's work.",
  "With few replies from someone, we assume they listen as the channel does (or as the part of the channel they talk with does). That keeps one stray reply from deciding a share, and it fades as their own replies and mentions add up. In the same way, someone nobody has answered yet is assumed to be heard about as much as a typical member of the channel, until the replies say otherwise; a member whom clearly more people answer keeps that attention.",
  'What an interval promises: in test channels whose true attention we knew (npm run calibrate), the 90% range held the true share for 8 to 10 members in 10. With only a few replies per member the ranges are often wider than they need to be: read a wide range as "not known yet", not as a sign of trouble. It does not promise that every member is inside: about one member in ten may lie outside their range, and in channels where each member talks with only a few others, nearly one in five. The range of the member with the largest share is the least sure: it held that member\'s true share in 8 to 9 test channels of 10 rather than 9 or more, and in very small channels (about 8 members) with few replies that share tends to be shown 1 to 3 points lower than it is.',
  "What to do with them: use them to notice patterns and to try different habits (who speaks first, who opens threads, asking for written views before deciding), then compare periods with /influence compare.",
  "Formats: a facilitator names how the channel runs its discussion (/influence format written-first) and ends it (/influence format end). /influence compare formats shows each format's figures on its own weeks and how likely one spreads influence more evenly. Comparing one month with the next can mislead, because channels change over time anyway; a format trial (/influence format trial A B weeks 4) takes turns week by week, so a slow change or one busy week falls on both formats. The bot switches the format at each week's start and says so in the channel, and when the trial ends it posts which format spread influence more evenly, or that there is no clear difference, with how sure it is. It calls a difference only when a gain of at least 0.05 in balance is very likely. On a very even channel the balance can be printed just above its range, because balance cannot go past 1.00 and every uncertain reading falls below it.",
];

/** `explain more`: the same figures by the names of the trade, for readers who want them. */
const MORE = [
  "The model is DeGroot's repeated averaging (DeGroot 1974, \"Reaching a consensus\"). Each member's spread of replies and mentions over the others is one row of the attention matrix; a member's influence share is their entry in the matrix's stationary vector (the long-run weights that repeated averaging gives each starting view). Effective voices is 1 / Σ share², the inverse of the concentration of the shares.",
  MODEL[2],
  "Counts fade with a half-life (halflife, default 14 days): a signal (one reply or mention) of that age counts half. The counting window is the last `window` days (default 28). Figures need at least `minmembers` active members (default 5) and 20 signals.",
  "Intervals and probabilities come from the posterior: the model is recomputed on 400 plausible attention matrices drawn given the counts (a Dirichlet posterior per member, whose prior follows the attention profile of the member's Louvain cluster, with a strength learnt per member from the counts; the profile itself is drawn from its posterior under a Gamma–Poisson model of how much attention a typical member receives, with a component for members far above the typical, both learnt from the counts; above 64 members the prior parts of rows with a strong prior share one drawn direction per group, sized to keep the spread the shares would have), and the interval is the central 90% of the results. The probability of being above the line is the part of those draws with the share at or above it, so with 400 draws nothing is ever certain.",
  "Structure: when some members only ever answer among themselves (closed groups of the attention graph), there is no single stationary vector and no shared view. How fast views settle depends on the self-weight, which nobody measured, so chat shows no speed; the CLI's --json keeps the second eigenvalue.",
  "Concentration index: the Herfindahl–Hirschman index (HHI = 10,000 · Σ share²) is in the CLI's --json for channels of 7 or more members, as an analogy with the 2023 U.S. Merger Guidelines (above 1,800 counts as highly concentrated there), never as a verdict. Clusters found in who answers whom (Louvain method, with their modularity) appear only when no facilitator labelled groups.",
];

function notes(texts: readonly string[]): Block[] {
  return texts.map((text): Block => ({ kind: "note", text }));
}

/** "Influence share: how much … Example: with 10 members …". */
export function figureLine(entry: (typeof FIGURES)[number]): string {
  const [term, meaning, example] = entry;
  return `${term}: ${meaning} Example: ${example}`;
}

const PRIVACY = [
  "What no message gives away: nobody can work out the share of a member who is not named to them to within 5 points either way. A group's share is shown only when the group and the rest of the channel each have at least as many active members as the channel's minimum (the minmembers setting, never below 3); otherwise it reads \"hidden: fewer than k members\". When almost everyone is named, so that the named shares would give the others' away by subtraction, individual shares are withheld and only the channel figures are shown. A group whose members changed during the window stays hidden until the window has moved on, so two answers cannot be subtracted.",
];

/** The how to read as neutral blocks. */
export function explainBlocks(): Block[] {
  return [
    { kind: "heading", text: "How to read plumbline's figures" },
    ...notes(COUNTED),
    { kind: "heading", text: "The model in plain words" },
    ...notes(MODEL.slice(0, 2)),
    { kind: "heading", text: "Every figure" },
    ...notes(FIGURES.map(figureLine)),
    ...notes(WHY),
    ...notes(LIMITS),
    {
      kind: "note",
      text: "The model behind the figures, by its technical names: /influence explain more",
    },
    ...notes(PRIVACY),
    { kind: "heading", text: "Cautions" },
    ...notes(CAUTIONS_FULL),
  ];
}

/** The how to read, ready to show. */
export function explainMessage(): OutgoingMessage {
  const blocks = explainBlocks();
  return { blocks, text: renderText(blocks) };
}

/** `explain more` as neutral blocks: the model by the names of the trade. */
export function explainMoreBlocks(): Block[] {
  return [
    { kind: "heading", text: "The model behind plumbline's figures" },
    ...notes(MORE),
    { kind: "heading", text: "Cautions" },
    ...notes(CAUTIONS_FULL),
  ];
}

/** `explain more`, ready to show. */
export function explainMoreMessage(): OutgoingMessage {
  const blocks = explainMoreBlocks();
  return { blocks, text: renderText(blocks) };
}
