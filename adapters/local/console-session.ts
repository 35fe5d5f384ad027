/**
 * @module console-session
 * The console's engine: one line at a time, as members typing in a channel. Messages go through
 * the real ingestion and store; `/influence …` goes through the real command router; moving the
 * clock runs the real scheduler hour by hour, so digests and notes fire exactly as they would.
 * Message text is read only to find `@mentions` and is then dropped.
 */
import { consentAt, snapshotIds } from "../../src/commands/member-view.js";
import type { ChatEvent } from "../../src/domain/events.js";
import type { ManualClock } from "../../src/ports/clock.js";
import type { Bot } from "../create-bot.js";
import type { LocalPlatform } from "./local-platform.js";

const HOUR = 3_600_000;
const NAME = /^[A-Za-z0-9_.-]{1,64}$/;

export const CONSOLE_HELP = `Type as members of the channel:
  ana> we could move the meeting @bo       a message from ana mentioning bo
  bo> (reply to 1) fine by me               a reply to message #1
  ana> /influence                            a command (try: /influence help)
Console commands:
  :clock +7d | +3h | +30m | 2026-12-07T09:00Z   move time; digests and notes fire when due
  :edit 3 @bo @cy     replace message #3's mentions      :delete 3 | :undelete 3
  :admin ana          treat ana as a workspace admin (again to undo)
  :time               show the console's clock           :help   this text      :quit
Only who replies to and mentions whom is kept; the words you type are never stored.`;

interface SentMessage {
  readonly id: string;
  readonly author: string;
  readonly at: number;
}

export class ConsoleSession {
  private readonly messages: SentMessage[] = [];
  private readonly admins = new Set<string>();
  private edits = 0;
  private lastTick: number;

  constructor(
    private readonly deps: {
      readonly bot: Bot;
      readonly platform: LocalPlatform;
      readonly clock: ManualClock;
      readonly channel: string;
      readonly print: (text: string) => void;
    },
  ) {
    this.lastTick = deps.clock.now();
  }

  /** Handles one input line; returns false when the session should end. */
  async line(raw: string): Promise<boolean> {
    const text = raw.trim();
    if (text === "" || text.startsWith("#")) return true;
    if (text.startsWith(":")) return this.consoleCommand(text.slice(1).trim());
    const match = /^([^>\s]+)>\s?(.*)$/.exec(text);
    if (!match || !NAME.test(match[1])) {
      this.say(
        `Not understood: start a line with a member's name and ">" (ana> hello), or type :help.`,
      );
      return true;
    }
    const [, member, body] = match;
    if (/^\/influence\b/.test(body))
      await this.command(member, body.replace(/^\/influence\s*/, ""));
    else await this.message(member, body);
    return true;
  }

  /** Moves the clock to `to`, running the scheduler at every hour boundary on the way. */
  async advanceTo(to: number): Promise<void> {
    const { clock } = this.deps;
    let next = Math.floor(this.lastTick / HOUR) * HOUR + HOUR;
    while (next <= to) {
      clock.set(next);
      await this.tick();
      next += HOUR;
    }
    clock.set(Math.max(to, clock.now()));
  }

  private async tick(): Promise<void> {
    this.lastTick = this.deps.clock.now();
    const report = await this.deps.bot.scheduler.tick();
    // "too-late" misses are slots from before the session (the scheduler looks back a week); a
    // console has no downtime, so only a lease that ran out is worth showing.
    for (const miss of report.missed) {
      if (miss.reason !== "too-late") this.say(`(a ${miss.kind} due ${miss.period} was missed)`);
    }
    for (const failure of report.failed)
      this.say(`(posting a ${failure.kind} failed: ${failure.error})`);
  }

  private async message(author: string, body: string): Promise<void> {
    const { clock, channel, bot } = this.deps;
    clock.advance(30_000);
    let rest = body;
    let parent: SentMessage | undefined;
    const reply = /^\(reply to #?(\d+)\)\s*/.exec(rest);
    if (reply) {
      parent = this.messages[Number(reply[1]) - 1];
      if (!parent) {
        this.say(`There is no message #${reply[1]} yet.`);
        return;
      }
      rest = rest.slice(reply[0].length);
    }
    const mentions = [...new Set([...rest.matchAll(/@([A-Za-z0-9_.-]+)/g)].map((m) => m[1]))];
    const number = this.messages.length + 1;
    const id = `m${number}`;
    const event: ChatEvent = {
      type: "message",
      at: clock.now(),
      channel,
      id,
      author,
      ...(parent ? { parent: parent.id, parentAuthor: parent.author } : {}),
      mentions,
    };
    await bot.onEvent(event, `console:${channel}:${id}`);
    this.messages.push({ id, author, at: event.at });
    const replyTo = parent && parent.author !== author ? [parent.author] : [];
    const mentioned = mentions.filter((m) => m !== author);
    const targets = [
      ...replyTo.map((p) => `replies to ${p}`),
      ...mentioned.map((m) => `mentions ${m}`),
    ];
    const why = targets.length ? await this.notCounted(author, [...replyTo, ...mentioned]) : "";
    this.say(`#${number} ${author}${targets.length ? `: ${targets.join(", ")}` : ""}${why}`);
  }

  /**
   * " (not counted: zed has not joined)" when a reply or mention cannot count because its author
   * or its target has not opted in (DESIGN.md §4.1); "" when every one counts.
   */
  private async notCounted(author: string, targets: readonly string[]): Promise<string> {
    const { bot, channel, clock } = this.deps;
    const snapshot = await bot.store.loadSnapshot(channel);
    const joined = (member: string) =>
      consentAt(snapshot, snapshotIds(bot.store, member), clock.now()) !== "off";
    if (!joined(author)) {
      return ` (not counted: ${author} has not joined; /influence join to opt in)`;
    }
    const missing = [...new Set(targets)].filter((t) => !joined(t));
    if (missing.length === 0) return "";
    const who =
      missing.length === 1
        ? missing[0]
        : `${missing.slice(0, -1).join(", ")} and ${missing.at(-1)}`;
    const counted = missing.length < new Set(targets).size ? "partly counted" : "not counted";
    return ` (${counted}: ${who} ${missing.length === 1 ? "has" : "have"} not joined)`;
  }

  private async command(member: string, args: string): Promise<void> {
    const { bot, channel, platform } = this.deps;
    const response = await bot.onCommand({
      channel,
      member,
      text: args,
      isPlatformAdmin: this.admins.has(member),
    });
    platform.show(channel, response.visibility === "private" ? member : null, response.message);
  }

  private async consoleCommand(text: string): Promise<boolean> {
    const [name, ...args] = text.split(/\s+/);
    switch (name) {
      case "help":
        this.say(CONSOLE_HELP);
        return true;
      case "quit":
      case "q":
        return false;
      case "time":
        this.say(`It is ${new Date(this.deps.clock.now()).toISOString()} on the console's clock.`);
        return true;
      case "clock":
        await this.clockCommand(args[0] ?? "");
        return true;
      case "edit":
      case "delete":
      case "undelete":
        await this.changeMessage(name, args);
        return true;
      case "admin": {
        const who = args[0] ?? "";
        if (!NAME.test(who)) this.say("Usage: :admin NAME");
        else if (this.admins.delete(who))
          this.say(`${who} is no longer treated as a workspace admin.`);
        else {
          this.admins.add(who);
          this.say(`${who} is now treated as a workspace admin.`);
        }
        return true;
      }
      default:
        this.say(`Unknown console command ":${name}". Type :help for the list.`);
        return true;
    }
  }

  private async clockCommand(arg: string): Promise<void> {
    const now = this.deps.clock.now();
    const relative = /^\+(\d+(?:\.\d+)?)([dhm])$/.exec(arg);
    let target: number | null = null;
    if (relative) {
      const unit = relative[2] === "d" ? 24 * HOUR : relative[2] === "h" ? HOUR : 60_000;
      target = now + Number(relative[1]) * unit;
    } else if (/^\d{4}-\d{2}-\d{2}T/.test(arg) && Number.isFinite(Date.parse(arg))) {
      target = Date.parse(arg);
    }
    if (target === null || target < now) {
      this.say("Usage: :clock +7d, +3h, +30m, or a later ISO time such as 2026-12-07T09:00:00Z.");
      return;
    }
    if (target - now > 400 * 24 * HOUR) {
      this.say("That is more than 400 days ahead; move the clock in smaller steps.");
      return;
    }
    await this.advanceTo(target);
    this.say(`Clock: ${new Date(this.deps.clock.now()).toISOString()}`);
  }

  private async changeMessage(kind: "edit" | "delete" | "undelete", args: string[]): Promise<void> {
    const { clock, channel, bot } = this.deps;
    const number = Number((args[0] ?? "").replace(/^#/, ""));
    const target = this.messages[number - 1];
    if (!Number.isInteger(number) || !target) {
      this.say(`Usage: :${kind} N, where N is a message number shown as #N.`);
      return;
    }
    clock.advance(10_000);
    this.edits++;
    const base = { at: clock.now(), channel, id: target.id };
    const event: ChatEvent =
      kind === "edit"
        ? {
            ...base,
            type: "edit",
            mentions: args
              .slice(1)
              .map((m) => m.replace(/^@/, ""))
              .filter((m) => NAME.test(m)),
          }
        : { ...base, type: kind };
    await bot.onEvent(event, `console:${channel}:${kind}:${this.edits}`);
    this.say(
      `#${number} ${kind === "edit" ? "edited" : kind === "delete" ? "deleted" : "restored"}.`,
    );
  }

  private say(text: string): void {
    this.deps.print(`${text}\n`);
  }
}
