/**
 * @module job-worker
 * Child process of `npm run calibrate --workers W`: measures one job per message and sends the
 * results back; exits when the parent disconnects.
 */
import { isPlumblineError } from "../../src/domain/errors.js";
import { type ChannelJob, measureChannel } from "./measure-channel.js";

/** Sends to the parent; a parent that has already stopped (after another job failed) is ignored. */
function reply(message: object): void {
  if (process.connected) process.send?.(message, undefined, {}, () => {});
}

process.on("message", (message: { k: number; job: ChannelJob }) => {
  try {
    reply({ k: message.k, result: measureChannel(message.job) });
  } catch (error) {
    const coded = isPlumblineError(error)
      ? { code: error.code, message: error.message, hint: error.hint }
      : undefined;
    reply({
      k: message.k,
      error: error instanceof Error ? error.stack : String(error),
      ...(coded ? { coded } : {}),
    });
  }
});
process.on("disconnect", () => process.exit(0));
