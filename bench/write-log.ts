/**
 * @module write-log
 * Writes a synthetic channel (bench/synthetic-channel.ts) as the JSON Lines event log of
 * DESIGN.md §3, the file both `plumbline analyze` and the peer script read in the end-to-end
 * bench. Streams line by line, so the 1M-message channel never needs one giant string.
 */

import { once } from "node:events";
import { createWriteStream } from "node:fs";
import type { ChatEvent } from "../src/domain/events.js";
import { syntheticChannel } from "./synthetic-channel.js";

function line(event: ChatEvent): string {
  return JSON.stringify({ ...event, at: new Date(event.at).toISOString() });
}

/** Writes the channel of `members`/`messages` (seed = members) to `path`; returns its size. */
export async function writeSyntheticLog(
  path: string,
  options: { readonly members: number; readonly messages: number },
): Promise<{ readonly events: number; readonly until: number }> {
  const channel = syntheticChannel({ ...options, seed: options.members });
  const out = createWriteStream(path);
  let chunk = "";
  for (const event of channel.events) {
    chunk += `${line(event)}\n`;
    if (chunk.length > 1 << 20) {
      if (!out.write(chunk)) await once(out, "drain");
      chunk = "";
    }
  }
  out.end(chunk);
  await once(out, "finish");
  return { events: channel.events.length, until: channel.until };
}

if (process.argv[1]?.endsWith("write-log.ts")) {
  const [path, members, messages] = process.argv.slice(2);
  if (path === undefined || members === undefined || messages === undefined) {
    throw new Error("usage: tsx bench/write-log.ts FILE MEMBERS MESSAGES");
  }
  await writeSyntheticLog(path, { members: Number(members), messages: Number(messages) });
}
