/**
 * @module delivery-key
 * Delivery keys for events imported from a neutral log: a message's key is its channel and id
 * (a log names each message once); any other event's key is a SHA-256 of its canonical JSON, so
 * importing the same log twice finds every key already seen and changes nothing.
 */
import { createHash } from "node:crypto";
import type { ChatEvent } from "../domain/events.js";

/** The import delivery key of a log event. */
export function logDeliveryKey(event: ChatEvent): string {
  if (event.type === "message") return `log:msg:${event.channel}:${event.id}`;
  return `log:evt:${createHash("sha256").update(canonicalJson(event)).digest("hex")}`;
}

/** JSON with object keys sorted, so equal events give equal text. */
export function canonicalJson(value: unknown): string {
  if (Array.isArray(value)) return `[${value.map(canonicalJson).join(",")}]`;
  if (typeof value === "object" && value !== null) {
    const entries = Object.entries(value as Record<string, unknown>)
      .filter(([, v]) => v !== undefined)
      .sort(([a], [b]) => (a < b ? -1 : a > b ? 1 : 0));
    return `{${entries.map(([k, v]) => `${JSON.stringify(k)}:${canonicalJson(v)}`).join(",")}}`;
  }
  return JSON.stringify(value);
}
