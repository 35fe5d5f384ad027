/**
 * The naming rules in command answers (DESIGN.md §6 and the issue): a `counted` member is never
 * named; a `named` member is named to facilitators, and to everyone else only with `names on`;
 * the reader always sees themself; no pseudonym or member key ever reaches a message.
 */
import { describe, expect, it } from "vitest";
import { busyChannel, NAMES, type Runner } from "./channel-fixture.js";

const COUNTED = ["UBO", "UCY", "UDEE", "UELI", "UFAY"];

function expectNoCountedNames(text: string, except?: string): void {
  for (const id of COUNTED) {
    if (id === except) continue;
    expect(text).not.toContain(NAMES[id]);
    expect(text).not.toContain(id);
  }
}

async function texts(r: Runner) {
  return {
    memberCheck: (await r.run("UCY", "check")).message.text,
    facilitatorCheck: (await r.run("UBOSS", "check")).message.text,
    posted: (await r.run("UBOSS", "check post")).message.text,
  };
}

describe("naming in checks", () => {
  it("with names off, only facilitators see the named member; counted members never appear", async () => {
    const r = await busyChannel();
    const { memberCheck, facilitatorCheck, posted } = await texts(r);
    expect(memberCheck).not.toContain(NAMES.UANA);
    expect(memberCheck).toContain("member 1");
    expect(posted).not.toContain(NAMES.UANA);
    expect(facilitatorCheck).toContain(NAMES.UANA);
    expectNoCountedNames(facilitatorCheck);
    expectNoCountedNames(posted);
    expectNoCountedNames(memberCheck, "UCY");
  });

  it("with names on, everyone sees the named member, still never a counted one", async () => {
    const r = await busyChannel();
    await r.run("UBOSS", "set names on");
    // Six active members, one named: a reader who also knows their own share leaves 4 unknown,
    // which is at least k only for k ≤ 4 (elimination, DESIGN.md §7).
    await r.run("UBOSS", "set minmembers 4");
    const { memberCheck, facilitatorCheck, posted } = await texts(r);
    expect(memberCheck).toContain(NAMES.UANA);
    expect(posted).toContain(NAMES.UANA);
    expect(facilitatorCheck).toContain(NAMES.UANA);
    expectNoCountedNames(facilitatorCheck);
    expectNoCountedNames(posted);
  });

  it("with names on and fewer than k members left unnamed, individual shares are withheld", async () => {
    const r = await busyChannel();
    await r.run("UBOSS", "set names on");
    const { memberCheck, posted } = await texts(r);
    for (const text of [memberCheck, posted]) {
      expect(text).toContain(
        "Individual shares are withheld: fewer than 5 members would be left unnamed",
      );
      expect(text).not.toContain(NAMES.UANA);
      expect(text).not.toMatch(/member \d/);
      expect(text).toContain("Effective voices");
      expect(text).toContain("Largest share");
    }
    expectNoCountedNames(posted);
  });

  it("the reader always sees themself, counted or named", async () => {
    const r = await busyChannel();
    const cy = (await r.run("UCY", "check")).message.text;
    expect(cy).toContain(`you (${NAMES.UCY})`);
    const ana = (await r.run("UANA", "check")).message.text;
    expect(ana).toContain(`you (${NAMES.UANA})`);
  });

  it("a member who falls back from named to counted is no longer named", async () => {
    const r = await busyChannel();
    await r.run("UBOSS", "set names on");
    await r.run("UANA", "join");
    const text = (await r.run("UBOSS", "check")).message.text;
    expect(text).not.toContain(NAMES.UANA);
    expect(text).not.toContain("UANA");
  });

  it("no answer carries a pseudonym or member key", async () => {
    const r = await busyChannel();
    const keys = COUNTED.map((id) => r.store.memberKey(id));
    for (const [who, text] of [
      ["UBOSS", "check"],
      ["UBO", "check"],
      ["UBOSS", "check post"],
      ["UBO", "me"],
      ["UBO", "status"],
      ["UBO", "compare"],
      ["UBO", "whatif cap 30%"],
      ["UCY", "set window 3"],
    ] as const) {
      const answer = (await r.run(who, text)).message.text;
      expect(answer).not.toContain("~");
      for (const key of keys) expect(answer).not.toContain(key);
    }
  });
});
