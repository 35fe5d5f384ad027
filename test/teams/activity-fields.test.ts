import { describe, expect, it } from "vitest";
import {
  commandWords,
  coreChannelId,
  deliveryKeyOf,
  malformedIdField,
  memberIdOf,
  parentOf,
  personMentions,
  threadRootId,
} from "../../adapters/teams/activity-fields.js";
import { fixture } from "./harness.js";

// Shapes from Microsoft's Teams bot pages (channel replies carry `;messageid=<root>`, platforms.md §2.4).
describe("Teams activity fields", () => {
  it("splits the thread suffix off the conversation id", () => {
    expect(coreChannelId("19:abc@thread.tacv2;messageid=1700000000001")).toBe(
      "teams:19:abc@thread.tacv2",
    );
    expect(coreChannelId("19:chat@thread.v2")).toBe("teams:19:chat@thread.v2");
    expect(threadRootId("19:abc@thread.tacv2;messageid=17")).toBe("17");
    expect(threadRootId("19:abc@thread.tacv2")).toBeNull();
  });

  it("a top-level post has no parent; a thread reply's parent is the root; a chat reply's the replied-to id", () => {
    expect(parentOf(fixture("channel-message.json"))).toBeNull();
    expect(parentOf(fixture("thread-reply.json"))).toBe("1001");
    expect(parentOf({ id: "9", conversation: { id: "19:chat@thread.v2" }, replyToId: "8" })).toBe(
      "8",
    );
  });

  it("member ids prefer the Entra object id", () => {
    expect(memberIdOf({ id: "29:x", aadObjectId: "aad-x" })).toBe("aad-x");
    expect(memberIdOf({ id: "29:x" })).toBe("29:x");
    expect(memberIdOf(undefined)).toBeNull();
  });

  it("drops the bot's own mention and non-person mentions", () => {
    const activity = fixture("mention.json", {
      entities: [
        { type: "mention", text: "<at>plumbline</at>", mentioned: { id: "28:bot-app-0001" } },
        {
          type: "mention",
          text: "<at>General</at>",
          mentioned: { id: "19:general0001@thread.tacv2" },
        },
        { type: "mention", text: "<at>Ana</at>", mentioned: { id: "29:ana-account" } },
        { type: "mention", text: "<at>Ana</at>", mentioned: { id: "29:ana-account" } },
        { type: "clientInfo", locale: "en-US" },
      ],
    });
    expect(personMentions(activity).map((m) => m.id)).toEqual(["29:ana-account"]);
  });

  it("reads the command after the bot's mention and turns other mentions into member arguments", () => {
    const activity = fixture("command-message.json", {
      entities: [
        { type: "mention", text: "<at>plumbline</at>", mentioned: { id: "28:bot-app-0001" } },
        { type: "mention", text: "<at>Ben</at>", mentioned: { id: "29:ben-account" } },
      ],
    });
    const resolve = (m: { id: string }) => (m.id === "29:ben-account" ? "aad-ben" : m.id);
    expect(
      commandWords(activity, "<at>plumbline</at> influence facilitator add <at>Ben</at>", resolve),
    ).toBe("facilitator add <@aad-ben>");
    expect(commandWords(activity, "<p><at>plumbline</at>&nbsp;Influence</p>", resolve)).toBe("");
    expect(commandWords(activity, "<at>plumbline</at> influencer is a word", resolve)).toBeNull();
    expect(commandWords(activity, "<at>plumbline</at> what is my influence", resolve)).toBeNull();
  });

  it("a redelivery has the same delivery key; later edits of one message have new ones", () => {
    const message = fixture("channel-message.json");
    expect(deliveryKeyOf(message)).toBe(deliveryKeyOf(fixture("channel-message.json")));
    expect(deliveryKeyOf(message)).toContain("tenant-0001");
    const edit = fixture("edit-message.json");
    const later = fixture("edit-message.json", { timestamp: "2026-11-01T11:00:00.000Z" });
    expect(deliveryKeyOf(edit)).not.toBe(deliveryKeyOf(later));
    expect(deliveryKeyOf(fixture("soft-delete.json"))).not.toBe(
      deliveryKeyOf(fixture("undelete.json")),
    );
  });
});

describe("malformedIdField", () => {
  it("accepts the conversation shapes Teams sends", () => {
    for (const id of [
      "19:general0001@thread.tacv2",
      "19:general0001@thread.tacv2;messageid=1700000000123",
      "19:meeting_NzU0@thread.v2",
      "19:0af1c3@thread.skype",
      "a:1QyB8-personal_Chat",
    ]) {
      expect(
        malformedIdField({ id: "1001", conversation: { id }, from: { id: "29:x" } }),
      ).toBeNull();
    }
  });

  it("names the first malformed field", () => {
    expect(malformedIdField({ conversation: { id: "19:a\u0000b@thread.v2" } })).toBe(
      "conversation.id",
    );
    expect(malformedIdField({ conversation: { id: "C0GENERAL" } })).toBe("conversation.id");
    expect(malformedIdField({ from: { id: "29:ana", aadObjectId: "aad\u001b[2J" } })).toBe(
      "from.aadObjectId",
    );
    expect(malformedIdField({ channelData: { team: { id: "19:t @thread.skype" } } })).toBe(
      "channelData.team.id",
    );
  });
});
