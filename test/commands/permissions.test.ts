/**
 * Who may run facilitator commands (DESIGN.md §6): configured facilitators, workspace admins and
 * members added with `facilitator add`; everyone else is told who can, and nothing changes.
 */
import { describe, expect, it } from "vitest";
import { readChannelSettings } from "../../src/commands/channel-settings-store.js";
import { DEFAULT_CHANNEL_SETTINGS } from "../../src/domain/channel-settings.js";
import { busyChannel, CHANNEL, runner } from "./channel-fixture.js";

const REFUSED = "Only this channel's facilitators can";

describe("facilitator commands refused to other members", () => {
  it.each([
    ["set window 21", "change settings"],
    ["check post", "post the figures in the channel"],
    ["group UCY night-shift", "label groups"],
    ["facilitator add UCY", "add or remove facilitators"],
    ["facilitator remove UBOSS", "add or remove facilitators"],
  ])("/influence %s", async (text, action) => {
    const r = await busyChannel();
    const before = await r.store.loadSnapshot(CHANNEL);
    const response = await r.run("UBO", text);
    expect(response.visibility).toBe("private");
    expect(response.message.text).toContain(`${REFUSED} ${action}`);
    // Names who can do it: the configured facilitator, and workspace admins.
    expect(response.message.text).toContain("Morgan Maple");
    expect(response.message.text).toContain("workspace admin");
    expect(await readChannelSettings(r.store, CHANNEL)).toEqual(DEFAULT_CHANNEL_SETTINGS);
    expect(await r.store.isFacilitator(CHANNEL, "UCY")).toBe(false);
    expect(await r.store.loadSnapshot(CHANNEL)).toEqual(before);
  });

  it("a channel without facilitators points to a workspace admin", async () => {
    const r = await runner({ facilitators: [] });
    const response = await r.run("UBO", "set window 21");
    expect(response.message.text).toContain("It has none yet: ask a workspace admin");
  });
});

describe("facilitators succeed", () => {
  it("a configured facilitator (PLUMBLINE_FACILITATORS)", async () => {
    const r = await runner({ facilitators: ["UBOSS"] });
    const response = await r.run("UBOSS", "set window 21");
    expect(response.message.text).toContain("Set window to 21 days (was 28 days)");
    expect((await readChannelSettings(r.store, CHANNEL)).windowDays).toBe(21);
  });

  it("a workspace admin, as the platform reports", async () => {
    const r = await runner({ facilitators: [] });
    await r.run("UCY", "set window 14", { isPlatformAdmin: true });
    expect((await readChannelSettings(r.store, CHANNEL)).windowDays).toBe(14);
  });

  it("a member added with facilitator add, until removed", async () => {
    const r = await runner({ facilitators: ["UBOSS"] });
    const added = await r.run("UBOSS", "facilitator add <@UCY|cy>");
    expect(added.message.text).toContain("Cy Cedar is now a facilitator of this channel");
    expect(await r.store.isFacilitator(CHANNEL, "UCY")).toBe(true);
    await r.run("UCY", "set minmembers 4");
    expect((await readChannelSettings(r.store, CHANNEL)).minMembers).toBe(4);
    // The role keeps its platform id whatever the consent, so the refusal can name them.
    const refusal = await r.run("UDEE", "set names on");
    expect(refusal.message.text).toContain("Morgan Maple, Cy Cedar");
    const removed = await r.run("UBOSS", "facilitator remove @UCY");
    expect(removed.message.text).toContain("Cy Cedar is no longer a facilitator");
    const again = await r.run("UCY", "set minmembers 6");
    expect(again.message.text).toContain(REFUSED);
    expect((await readChannelSettings(r.store, CHANNEL)).minMembers).toBe(4);
  });

  it("a configured facilitator cannot be removed by command, and is told why", async () => {
    const r = await runner({ facilitators: ["UBOSS", "UGUS"] });
    const response = await r.run("UBOSS", "facilitator remove UGUS");
    expect(response.message.text).toContain("stays a facilitator through the bot's configuration");
  });

  it("check post goes to the channel, but not from inside a thread", async () => {
    const r = await busyChannel();
    const posted = await r.run("UBOSS", "check post");
    expect(posted.visibility).toBe("channel");
    expect(posted.message.text).toContain("Posted by a facilitator");
    const inThread = await r.run("UBOSS", "check post", { inThread: true });
    expect(inThread.visibility).toBe("private");
    expect(inThread.message.text).toContain("not in a thread");
  });
});
