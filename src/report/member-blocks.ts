/**
 * @module member-blocks
 * The answers one member sees privately: `me` (their own share, its interval and the chance of
 * being above the line, or why they are not counted) and `status` (their consent, how much the
 * window holds, the channel's settings and when the next digest is due).
 */

import type { Block, FigureRow } from "../domain/blocks.js";
import type { ChannelSettings, Weekday } from "../domain/channel-settings.js";
import type { ConsentLevel } from "../domain/events.js";
import type { AnalysisReport } from "../domain/report.js";
import { neededText, windowText } from "./digest-blocks.js";
import { isoDay, percent, percentRange, probability } from "./format.js";
import { plainReading } from "./reading.js";

const WEEKDAYS: Record<Weekday, string> = {
  1: "Monday",
  2: "Tuesday",
  3: "Wednesday",
  4: "Thursday",
  5: "Friday",
  6: "Saturday",
  7: "Sunday",
};

export function weekdayName(day: Weekday): string {
  return WEEKDAYS[day];
}

function consentWords(level: ConsentLevel): string {
  if (level === "named") return "named (counted; your name may be shown)";
  if (level === "counted") return "counted (never named to others)";
  return "not joined (not counted)";
}

export interface MeArgs {
  readonly report: AnalysisReport;
  /** The reader's id as it appears in the report. */
  readonly reader: string;
  readonly consent: ConsentLevel;
}

function ordinal(k: number): string {
  const tens = k % 100;
  if (tens >= 11 && tens <= 13) return `${k}th`;
  return `${k}${["th", "st", "nd", "rd"][k % 10] ?? "th"}`;
}

/** The `me` answer: the reader's own figures, or why there are none. */
export function meBlocks(args: MeArgs): Block[] {
  const { report, reader, consent } = args;
  const blocks: Block[] = [
    { kind: "heading", text: `Your figures · ${report.channel}` },
    { kind: "note", text: windowText(report) },
  ];
  if (consent === "off") {
    blocks.push({
      kind: "note",
      text: "You are not counted in this channel, so there are no figures about you. To opt in, use /influence join (counted, never named to others) or /influence join named (your name may be shown). You can leave again at any time with /influence leave.",
    });
    return blocks;
  }
  if (report.status === "insufficient") {
    blocks.push({
      kind: "note",
      text: `You are opted in as ${consentWords(consent)}. ${neededText(report)}`,
    });
    return blocks;
  }
  const rank = (report.influence ?? []).findIndex((e) => e.member === reader);
  if (report.status !== "ok" || rank < 0) {
    blocks.push({
      kind: "note",
      text:
        report.status === "ok"
          ? `You are opted in as ${consentWords(consent)}, but you had no replies or mentions to or from other opted-in members in these days, so you have no share yet.`
          : `You are opted in as ${consentWords(consent)}. ${plainReading(report)}`,
    });
    return blocks;
  }
  const entry = (report.influence ?? [])[rank];
  const even = 1 / report.members;
  const ratio = entry.share / even;
  const compared =
    ratio >= 1.5
      ? "well above an even split"
      : ratio > 1.1
        ? "somewhat above an even split"
        : ratio >= 0.9
          ? "close to an even split"
          : ratio >= 0.67
            ? "somewhat below an even split"
            : "well below an even split";
  const line = report.line?.threshold ?? null;
  const rows: FigureRow[] = [
    {
      label: "Your share",
      value: `${percent(entry.share)}, interval ${percentRange(entry.low, entry.high)}`,
      detail: `${ordinal(rank + 1)} of ${report.members}`,
    },
    { label: "Even split", value: `${percent(even)} each for ${report.members} active members` },
  ];
  if (line !== null) {
    rows.push({
      label: `Above the ${percent(line)} line`,
      value: `probability ${probability(entry.pAbove)}`,
    });
  }
  rows.push({
    label: "How much others turn to you",
    value: entry.attentionReceived.toFixed(2),
    detail: "1.00 = as much as you turn to them",
  });
  blocks.push({
    kind: "note",
    text: `Your influence share is ${compared}. It is shown only to you.`,
  });
  blocks.push({ kind: "figures", rows });
  blocks.push({
    kind: "cautions",
    text: "This counts replies and mentions only. A small share says nothing about the value of what you contribute, and it must never be used to judge your work.",
  });
  return blocks;
}

/** The channel's settings as rows: the `set` key, its value and what it means. */
export function settingsRows(settings: ChannelSettings): FigureRow[] {
  const digest =
    settings.digest === "off"
      ? "off"
      : `${weekdayName(settings.digest.weekday)}s at ${settings.digest.time}`;
  const notes =
    settings.notes === "channel"
      ? "posted in the channel"
      : settings.notes === "facilitators"
        ? "sent to facilitators only"
        : "off";
  return [
    {
      label: "threshold",
      value: settings.threshold === "auto" ? "auto" : percent(settings.threshold),
      detail:
        settings.threshold === "auto"
          ? "the line: 30%, or twice an even share when that is larger"
          : "the line above which a balance note is posted",
    },
    {
      label: "window",
      value: `${settings.windowDays} days`,
      detail: "how many days of replies and mentions count",
    },
    {
      label: "halflife",
      value: settings.halfLifeDays === 0 ? "0" : `${settings.halfLifeDays} days`,
      detail:
        settings.halfLifeDays === 0
          ? "no fading: every counted day counts the same"
          : "a reply or mention this old counts half as much as one from today",
    },
    { label: "digest", value: digest, detail: "the weekly balance digest" },
    { label: "timezone", value: settings.timezone, detail: "for the digest time" },
    {
      label: "names",
      value: settings.names ? "on" : "off",
      detail: settings.names
        ? "members who joined as named may be named to the channel"
        : "nobody is named to the channel",
    },
    { label: "notes", value: settings.notes, detail: `balance notes are ${notes}` },
    {
      label: "minmembers",
      value: `${settings.minMembers}`,
      detail: "fewest active members before any figure is shown",
    },
    {
      label: "background",
      value: `${settings.background}`,
      detail:
        settings.background === "auto"
          ? "with few replies from someone, we assume they listen as the channel does; how strongly is learnt from the replies"
          : "how many signals' worth we assume someone with few replies listens as the channel does",
    },
  ];
}

/** A time written in the channel's time zone, e.g. "Monday 7 December 2026, 09:00 (Europe/Berlin)". */
export function zonedTime(at: number, timezone: string): string {
  const text = new Intl.DateTimeFormat("en-GB", {
    timeZone: timezone,
    weekday: "long",
    day: "numeric",
    month: "long",
    year: "numeric",
    hour: "2-digit",
    minute: "2-digit",
    hourCycle: "h23",
  }).format(new Date(at));
  return `${text.replace(" at ", ", ")} (${timezone})`;
}

export interface StatusArgs {
  readonly report: AnalysisReport;
  readonly consent: {
    readonly level: ConsentLevel;
    /** When the current level was recorded (epoch ms), if joined. */
    readonly since: number | null;
    readonly notice: string | null;
  };
  readonly facilitator: boolean;
  /** Members whose current consent is `counted` or `named`. */
  readonly optedIn: number;
  readonly settings: ChannelSettings;
  /** Next digest time (epoch ms), or null when digests are off. */
  readonly nextDigest: number | null;
}

/** The `status` answer. */
export function statusBlocks(args: StatusArgs): Block[] {
  const { report, consent, settings } = args;
  const you =
    consent.level === "off"
      ? "not joined: /influence join to opt in"
      : `${consentWords(consent.level)}${consent.since === null ? "" : ` since ${isoDay(new Date(consent.since).toISOString())}`}`;
  const rows: FigureRow[] = [
    {
      label: "You",
      value: you,
      ...(consent.level !== "off" && consent.notice ? { detail: `notice ${consent.notice}` } : {}),
    },
    { label: "Your role", value: args.facilitator ? "facilitator" : "member" },
    { label: "Opted-in members", value: `${args.optedIn}` },
    { label: "Counting period", value: windowText(report) },
    {
      label: "In that period",
      value: `${report.members} active member${report.members === 1 ? "" : "s"}, ${report.signals} ${report.signals === 1 ? "reply or mention" : "replies and mentions"}`,
    },
    {
      label: "Figures",
      value: report.status === "insufficient" ? "not yet" : "available (/influence check)",
    },
    {
      label: "Next digest",
      value: args.nextDigest === null ? "off" : zonedTime(args.nextDigest, settings.timezone),
    },
  ];
  const blocks: Block[] = [
    { kind: "heading", text: `Status · ${report.channel}` },
    { kind: "figures", rows },
  ];
  if (report.status === "insufficient") blocks.push({ kind: "note", text: neededText(report) });
  blocks.push({ kind: "heading", text: "Settings" });
  blocks.push({ kind: "figures", rows: settingsRows(settings) });
  return blocks;
}
