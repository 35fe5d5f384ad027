/**
 * Every meeting-format message, built the way the bot builds it, for the platform checks of
 * every-message.ts: `format <name>|end|list`, `compare formats` (with and without a pair, and on a
 * channel with no formats), a trial's plan, a week's switch and its result (the scheduler's
 * posts), and a digest carrying the format line. The channel is invented: seven members who
 * mention the next two each day, and in the concentrated format also mention UANA.
 */
import { analyzeSnapshot } from "../../src/analysis/analyze-snapshot.js";
import { digestFormatLine } from "../../src/commands/format-commands.js";
import { dueTrialPosts } from "../../src/commands/trial-posts.js";
import { DEFAULT_SETTINGS } from "../../src/domain/settings.js";
import type { OutgoingMessage } from "../../src/ports/chat-platform.js";
import type { Store } from "../../src/ports/store.js";
import { digestMessage } from "../../src/report/digest-blocks.js";
import { CHANNEL, DAY, mentions, runner, T0 } from "../commands/channel-fixture.js";

export const FORMAT_MEMBERS = ["UANA", "UBO", "UCY", "UDEE", "UELI", "UFAY", "UGUS"];

/** `days` days from `from`: each member mentions the next two; under `lead` everyone mentions UANA. */
export async function formatDays(store: Store, from: number, days: number, lead: boolean) {
  for (let d = 0; d < days; d++) {
    const at = from + d * DAY + 3_600_000;
    for (let i = 0; i < FORMAT_MEMBERS.length; i++) {
      for (const k of [1, 2]) {
        const to = FORMAT_MEMBERS[(i + k) % FORMAT_MEMBERS.length];
        await mentions(store, { from: FORMAT_MEMBERS[i], to, times: 1, at: at + k * 60_000 });
      }
      if (lead && i > 0) {
        await mentions(store, { from: FORMAT_MEMBERS[i], to: "UANA", times: 3, at: at + 600_000 });
      }
    }
  }
}

async function firstPost(store: Store, now: number): Promise<OutgoingMessage> {
  const [post] = await dueTrialPosts(store, CHANNEL, now);
  const message = post ? await post.compose() : null;
  if (message === null) throw new Error(`no trial post due at ${new Date(now).toISOString()}`);
  return message;
}

/** The format messages, each with a name saying which it is. */
export async function formatMessages(): Promise<{ name: string; message: OutgoingMessage }[]> {
  const out: { name: string; message: OutgoingMessage }[] = [];
  const r = await runner({ now: T0 });
  const run = async (name: string, member: string, text: string, now: number) => {
    out.push({ name, message: (await r.run(member, text, { now })).message });
  };
  for (const m of FORMAT_MEMBERS) await r.run(m, "join", { now: T0 });
  await run("compare formats (no formats yet)", "UBO", "compare formats", T0);
  await run("format set", "UBOSS", "format coordinator-led", T0 + 1);
  await formatDays(r.store, T0, 7, true);
  await run("format set (switch)", "UBOSS", "format rotating-hosts", T0 + 7 * DAY);
  await formatDays(r.store, T0 + 7 * DAY, 7, false);
  await run("format list", "UBO", "format list", T0 + 14 * DAY);
  await run("compare formats", "UBO", "compare formats", T0 + 14 * DAY);
  await run(
    "compare formats A B",
    "UBO",
    "compare formats rotating-hosts coordinator-led",
    T0 + 14 * DAY,
  );
  const report = analyzeSnapshot(await r.store.loadSnapshot(CHANNEL), DEFAULT_SETTINGS, {
    until: T0 + 14 * DAY,
  });
  const line = await digestFormatLine(r.store, CHANNEL, T0 + 14 * DAY);
  if (line === null) throw new Error("no digest format line");
  out.push({
    name: "digest with format line",
    message: digestMessage({
      report,
      previous: null,
      policy: { namesOn: false },
      formatLines: [line],
    }),
  });
  await run("format end", "UBOSS", "format end", T0 + 14 * DAY + 1);
  const start = T0 + 14 * DAY + 2;
  await run(
    "format trial (plan)",
    "UBOSS",
    "format trial coordinator-led rotating-hosts weeks 2",
    start,
  );
  await run("format list (trial running)", "UBO", "format list", start + DAY);
  await formatDays(r.store, start, 7, true);
  out.push({ name: "trial week switch", message: await firstPost(r.store, start + 7 * DAY) });
  await formatDays(r.store, start + 7 * DAY, 7, false);
  out.push({ name: "trial result", message: await firstPost(r.store, start + 14 * DAY) });
  await r.store.close();
  return out;
}
