/**
 * @module chart-upload
 * The digest's chart image on Slack, as a file in the digest's thread. The alternative, uploading
 * first without sharing and pointing an `image` block at it with `slack_file: { id }`, is not
 * reliable: a file uploaded without `channel_id` is private to the bot, so `chat.postMessage`
 * answers `invalid_blocks` ("invalid slack file"), and even a shared file is processed
 * asynchronously, so its id may not resolve yet (slackapi/python-slack-sdk#1658 and #1521,
 * slackapi/slack-github-action#413, where the maintainers suggest polling `files.info`); sharing
 * it first into the channel would post a second message before the digest. So the digest is posted
 * first, saying the chart is in its thread, and `files.uploadV2` (files.getUploadURLExternal, the
 * upload, files.completeUploadExternal) shares the PNG with `thread_ts` set to the digest. If that
 * fails, the digest is edited once with `chat.update` to say the chart is missing. Both calls pass
 * the channel's send queue, which retries only a certain refusal (429), never an unknown outcome.
 */
import type { Logger } from "../../src/ports/logger.js";
import { errorCode } from "./guarded-receiver.js";
import type { SendQueue } from "./send-queue.js";

export const CHART_FILENAME = "influence-shares.png";
export const CHART_IN_THREAD_TEXT = "Chart image of these shares: in the thread below.";
export const CHART_MISSING_TEXT =
  "Chart image missing (could not be rendered or uploaded); the text bars above show the same figures.";

/** `WebClient.filesUploadV2`, as far as it is used. */
export type SlackUploadApi = (args: Record<string, unknown>) => Promise<{ ok?: boolean }>;

export interface ChartUploadArgs {
  readonly queue: SendQueue;
  readonly upload: SlackUploadApi;
  readonly logger: Logger;
  /** The core channel id (the queue's key) and Slack's channel id. */
  readonly channel: string;
  readonly slackChannel: string;
  /** The digest's ts: the thread the file goes into. */
  readonly threadTs: string;
  readonly png: Buffer;
  readonly alt: string;
}

/** Shares the chart PNG in the digest's thread; resolves to whether Slack confirmed it. */
export async function uploadChartToThread(args: ChartUploadArgs): Promise<boolean> {
  try {
    const result = await args.queue.run(args.channel, () =>
      args.upload({
        channel_id: args.slackChannel,
        thread_ts: args.threadTs,
        file: args.png,
        filename: CHART_FILENAME,
        title: "Influence shares",
        alt_text: args.alt,
      }),
    );
    if (result.ok !== true) throw new Error("files.uploadV2 did not answer ok");
    return true;
  } catch (error) {
    // The code only: an error may carry the request, and the request holds the image.
    args.logger.warn(
      { channel: args.channel, error: errorCode(error) },
      "chart upload failed; the digest says the chart is missing",
    );
    return false;
  }
}
