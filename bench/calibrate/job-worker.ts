/**
 * @module job-worker
 * Child process of `npm run calibrate --workers W`: measures one job per message and sends the
 * results back; exits when the parent disconnects.
 */
import { type ChannelJob, measureChannel } from "./measure-channel.js";

process.on("message", (message: { k: number; job: ChannelJob }) => {
  try {
    process.send?.({ k: message.k, result: measureChannel(message.job) });
  } catch (error) {
    process.send?.({ k: message.k, error: error instanceof Error ? error.stack : String(error) });
  }
});
process.on("disconnect", () => process.exit(0));
