import { describe, expect, it } from "vitest";
import { createMemoryStore } from "../../src/store/memory-store.js";
import { storeContract } from "./store-contract.js";
import { TEST_KEY } from "./test-key.js";

storeContract("memory", async () => ({
  store: createMemoryStore({ idKey: TEST_KEY }),
  cleanup: async () => undefined,
}));

describe("memory store", () => {
  it("refuses a short id key with STORE_NO_ID_KEY", () => {
    expect(() => createMemoryStore({ idKey: "short" })).toThrow(
      expect.objectContaining({ code: "STORE_NO_ID_KEY" }),
    );
  });
});
