/**
 * @module explain-blocks
 * The how to read (`/influence explain`): every figure in plain words, the model behind them and
 * its assumptions, why concentration makes a pooled view less reliable, what the line is, what the
 * figures cannot tell, and the full cautions. Written for a facilitator who does no maths. The
 * model is DeGroot's repeated averaging (DeGroot 1974, "Reaching a consensus", JASA 69:118–121).
 */

import type { Block } from "../domain/blocks.js";
import type { OutgoingMessage } from "../ports/chat-platform.js";
import { CAUTIONS_FULL } from "./cautions.js";
import { renderText } from "./render-text.js";

const COUNTED = [
  "Only members who opted in are counted, and only what passes between two of them: each time one replies to or mentions the other, that is one signal of attention from the first to the second. Message text, links and files are never read or stored.",
  "Recent activity counts more than old activity: with the default half-life of 14 days, a reply from two weeks ago counts half as much as one from today. Only the window is used: the last 28 days unless a facilitator changed it.",
];

const MODEL = [
  "The idea: in a discussion, people adjust their view toward the views of those they pay attention to. Picture every member repeatedly taking a weighted average of the views they listen to, weighted by how they spread their replies and mentions. After enough rounds the channel settles on one pooled view. A member's influence share is how much of that pooled view comes from their starting view. The shares add up to 100%.",
  "Someone who is answered and mentioned a lot by members who are themselves answered a lot gets a large share. Talking a lot does not by itself raise a share; being listened to does.",
  "Two assumptions fill in what the counts cannot see. The channel's habits: with few replies from someone, we assume they listen as the channel does (or as the part of the channel they talk with does), spreading their attention like the attention everyone gives. How strongly we assume it is learnt from the replies themselves; it keeps one stray reply from deciding a share and fades as a member's own replies and mentions add up, so in an active channel the counted signals, not this assumption, decide the shares. Self-weight: how much each member holds on to their own view in each round. It changes only how fast views settle, never the shares.",
];

const FIGURES: readonly [string, string][] = [
  [
    "Influence share",
    "how much of the channel's pooled view comes from this member. With 10 members an even split is 10% each.",
  ],
  [
    "Interval",
    "the range the figure is likely to lie in, given how little or much was counted (90% of plausible values fall inside). Wide ranges mean little data; read the range, not just the middle. What it promises: in test channels whose true attention we knew, the 90% range held the true share for about 8 to 9 members in 10 (measured with npm run calibrate). It does not promise that every member's true share is inside: one member in ten or more may lie outside their range. In large channels where one member leads and everyone has written only a few replies, as few as 3 members in 4 were inside, because the leader's own attention is then seen through a handful of replies.",
  ],
  [
    "Effective voices",
    'how many equally weighted, independent opinions the pooled view is worth. "5.2 of 12" means twelve members took part but their pooled view is worth only about five evenly heard voices.',
  ],
  [
    "Balance",
    "effective voices divided by active members: 1.00 is perfectly even, lower is more lopsided.",
  ],
  ["Largest share", "the biggest single influence share, with its interval."],
  [
    "Line",
    "the share above which the bot posts a balance note. By default it is 30%, or twice an even share in small channels (with 5 members, 40%). A note is posted only when a member is above the line with at least 80% probability, not at the first brush with it. After a note, the next one waits until the largest share has fallen 5 points below the line, and a channel gets at most one note a week.",
  ],
  [
    "Probability above the line",
    "how sure we are that a share really is above the line, given the data, as a percentage.",
  ],
  [
    "Structure",
    "whether everyone is connected into one conversation. If some groups only ever listen among themselves, there is no single pooled view.",
  ],
  [
    "Groups",
    "when a facilitator labels groups (for example departments or shifts), each group's share of influence beside its share of the members. A group holding 50% of influence with 25% of the members is heard twice its size.",
  ],
  [
    "Where the largest share comes from",
    "which members' attention feeds the largest share, as parts that add up to 100%.",
  ],
  [
    "HHI (analogy)",
    "a concentration index borrowed from the 2023 U.S. merger guidelines (above 1,800 counts as highly concentrated there), shown for channels of 7 or more only as a comparison, never as a verdict.",
  ],
];

const WHY = [
  "Why concentration matters: a group decides well when it pools what many members know independently. If most attention flows to one or two members, everyone's view drifts toward theirs, and the pooled view is worth little more than those one or two opinions, however many people took part. Effective voices measures exactly this: the number of independent opinions the pooled view is really worth.",
];

const LIMITS = [
  "What the figures cannot tell: counts of replies and mentions are a rough proxy for attention. People also listen in meetings, in private messages and by reading without replying. Silence is not agreement, and a member with a small share may still be the one everyone reads. The figures say nothing about whether anyone is right, and nothing about anyone's work.",
  "What to do with them: use them to notice patterns and to try different habits (who speaks first, who opens threads, asking for written views before deciding), then compare periods with /influence compare.",
];

/** The how to read as neutral blocks. */
export function explainBlocks(): Block[] {
  const notes = (texts: readonly string[]): Block[] =>
    texts.map((text): Block => ({ kind: "note", text }));
  return [
    { kind: "heading", text: "How to read plumbline's figures" },
    ...notes(COUNTED),
    { kind: "heading", text: "The model in plain words" },
    ...notes(MODEL),
    { kind: "heading", text: "Every figure" },
    ...notes(FIGURES.map(([label, value]) => `${label}: ${value}`)),
    ...notes(WHY),
    ...notes(LIMITS),
    { kind: "heading", text: "Cautions" },
    ...notes(CAUTIONS_FULL),
  ];
}

/** The how to read, ready to show. */
export function explainMessage(): OutgoingMessage {
  const blocks = explainBlocks();
  return { blocks, text: renderText(blocks) };
}
