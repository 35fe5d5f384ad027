/**
 * The digest's chart image on Slack, against a nock'd stand-in for the Web API: the digest is
 * posted once with a line pointing to its thread, then `files.uploadV2` runs its three steps
 * (files.getUploadURLExternal, the POST of the bytes to the returned upload URL,
 * files.completeUploadExternal with `channel_id` and `thread_ts`; docs.slack.dev/reference/methods/
 * files.getUploadURLExternal and files.completeUploadExternal). A failed upload is not retried and
 * the digest is edited once to say the chart is missing; a chart that cannot be rendered is never
 * uploaded and the digest says so at once. PNG signature and IHDR per W3C 2003, "Portable Network
 * Graphics (PNG) Specification (Second Edition)", §5.2 and §11.2.2.
 */
import nock from "nock";
import { afterEach, describe, expect, it } from "vitest";
import type { ChartRenderer } from "../../adapters/chart-image.js";
import { svgToPng } from "../../adapters/chart-image.js";
import {
  CHART_FILENAME,
  CHART_IN_THREAD_TEXT,
  CHART_MISSING_TEXT,
} from "../../adapters/slack/chart-upload.js";
import { API_HOST, CHANNEL, consent, type Harness, startHarness, T0 } from "./harness.js";

let h: Harness;

afterEach(async () => {
  await h.close();
});

const DIGEST_AT = T0 + 60 * 60_000 + 30_000; // Monday 09:00:30 UTC
const DIGEST_TS = "1793610030.000100";
const PNG_SIGNATURE_HEX = "89504e470d0a1a0a";

const MEMBERS = ["U0ANA", "U0BO", "U0CY", "U0DEV", "U0EMA", "U0FIN"];

/** Six members counted, not named (no users.info look-ups), and 30 mentions: enough for figures. */
async function start(renderChart?: ChartRenderer): Promise<void> {
  h = await startHarness(renderChart ? { renderChart } : {});
  await consent(h, MEMBERS, "counted");
  for (let k = 0; k < 30; k++) {
    // Each member mentions the next one or two round the circle: fairly even, under the line.
    const author = MEMBERS[k % 6];
    const target = MEMBERS[(k + 1 + (k % 2)) % 6];
    await h.bot.onEvent(
      {
        type: "message",
        at: T0 + k * 60_000,
        channel: CHANNEL,
        id: `m${k}`,
        author,
        mentions: [target],
      },
      `test-message-${k}`,
    );
  }
}

function formBody(body: unknown): Record<string, string> {
  return typeof body === "string"
    ? Object.fromEntries(new URLSearchParams(body))
    : (body as Record<string, string>);
}

interface SlackBlockSeen {
  type: string;
  text?: { text: string };
  elements?: { text: string }[];
}

function contextTexts(blocks: string): string[] {
  return (JSON.parse(blocks) as SlackBlockSeen[])
    .filter((b) => b.type === "context")
    .flatMap((b) => (b.elements ?? []).map((e) => e.text));
}

/** Answers chat.postMessage (recording each call) and chat.update (recording each call). */
function chatApi(posted: Record<string, string>[], updated: Record<string, string>[]) {
  nock(API_HOST)
    .post("/api/chat.postMessage", (body) => {
      posted.push(formBody(body));
      return true;
    })
    .reply(200, { ok: true, channel: "C0GENERAL", ts: DIGEST_TS });
  nock(API_HOST)
    .post("/api/chat.update", (body) => {
      updated.push(formBody(body));
      return true;
    })
    .reply(200, { ok: true, channel: "C0GENERAL", ts: DIGEST_TS });
}

describe("the digest's chart on Slack", () => {
  it("posts the digest, then shares the PNG in its thread with files.uploadV2", async () => {
    await start();
    const posted: Record<string, string>[] = [];
    const updated: Record<string, string>[] = [];
    chatApi(posted, updated);
    const asked: Record<string, string>[] = [];
    const uploaded: string[] = [];
    const completed: Record<string, string>[] = [];
    const scope = nock(API_HOST)
      .post("/api/files.getUploadURLExternal", (body) => {
        asked.push(formBody(body));
        return true;
      })
      .reply(200, { ok: true, upload_url: `${API_HOST}/upload/v1/F0CHART01`, file_id: "F0CHART01" })
      .post("/upload/v1/F0CHART01", (body) => {
        uploaded.push(String(body));
        return true;
      })
      .reply(200, "OK - 1234")
      .post("/api/files.completeUploadExternal", (body) => {
        completed.push(formBody(body));
        return true;
      })
      .reply(200, { ok: true, files: [{ id: "F0CHART01", title: "Influence shares" }] });
    h.clock.set(DIGEST_AT);
    const report = await h.bot.scheduler.tick();
    expect(report.failed).toEqual([]);
    expect(report.posted).toEqual([expect.objectContaining({ messageId: DIGEST_TS })]);
    scope.done();
    expect(posted).toHaveLength(1);
    expect(contextTexts(posted[0].blocks)).toContain(CHART_IN_THREAD_TEXT);
    // The line sits right after the bars' code block.
    const blocks = JSON.parse(posted[0].blocks) as SlackBlockSeen[];
    const at = blocks.findIndex((b) => b.elements?.[0]?.text === CHART_IN_THREAD_TEXT);
    expect(blocks[at - 1].text?.text.startsWith("```")).toBe(true);
    expect(asked).toHaveLength(1);
    expect(asked[0].filename).toBe(CHART_FILENAME);
    expect(asked[0].alt_text).toMatch(/^Influence shares, largest first, with \d+% intervals/);
    expect(Number(asked[0].length)).toBeGreaterThan(1000);
    expect(uploaded).toHaveLength(1);
    // nock hands over the multipart body hex-encoded; the file part is the PNG, drawn at twice
    // the chart's 460 px.
    const bytes = Buffer.from(uploaded[0], "hex");
    const at0 = bytes.indexOf(Buffer.from(PNG_SIGNATURE_HEX, "hex"));
    expect(at0).toBeGreaterThan(0);
    expect(bytes.subarray(at0 + 12, at0 + 16).toString("ascii")).toBe("IHDR");
    expect(bytes.readUInt32BE(at0 + 16)).toBe(920);
    expect(completed).toHaveLength(1);
    expect(completed[0].channel_id).toBe("C0GENERAL");
    expect(completed[0].thread_ts).toBe(DIGEST_TS);
    expect(JSON.parse(completed[0].files)).toEqual([expect.objectContaining({ id: "F0CHART01" })]);
    expect(updated).toHaveLength(0);
  });

  it("a 500 from files.getUploadURLExternal: no retry, the digest once, then marked missing", async () => {
    await start();
    const posted: Record<string, string>[] = [];
    const updated: Record<string, string>[] = [];
    chatApi(posted, updated);
    let asked = 0;
    nock(API_HOST)
      .post("/api/files.getUploadURLExternal")
      .times(3)
      .reply(() => {
        asked += 1;
        return [500, "oops"];
      });
    const complete = nock(API_HOST).post("/api/files.completeUploadExternal").reply(200, {});
    h.clock.set(DIGEST_AT);
    const report = await h.bot.scheduler.tick();
    expect(report.failed).toEqual([]);
    expect(report.posted).toEqual([expect.objectContaining({ messageId: DIGEST_TS })]);
    expect(asked).toBe(1);
    expect(complete.isDone()).toBe(false);
    expect(posted).toHaveLength(1);
    expect(updated).toHaveLength(1);
    expect(updated[0].ts).toBe(DIGEST_TS);
    expect(contextTexts(updated[0].blocks)).toContain(CHART_MISSING_TEXT);
    expect(contextTexts(updated[0].blocks)).not.toContain(CHART_IN_THREAD_TEXT);
    const warnings = h.logger.records.filter((r) => r.message.startsWith("chart upload failed"));
    expect(warnings).toHaveLength(1);
    // Logged without payload: neither the image (base64 "iVBOR…") nor its bytes.
    expect(JSON.stringify(h.logger.records)).not.toMatch(/iVBOR|89504e47/);
  });

  it("a 500 at the upload URL: the file is never completed and the digest says so", async () => {
    await start();
    const posted: Record<string, string>[] = [];
    const updated: Record<string, string>[] = [];
    chatApi(posted, updated);
    let uploads = 0;
    nock(API_HOST)
      .post("/api/files.getUploadURLExternal")
      .reply(200, { ok: true, upload_url: `${API_HOST}/upload/v1/F0CHART02`, file_id: "F0CHART02" })
      .post("/upload/v1/F0CHART02")
      .times(2)
      .reply(() => {
        uploads += 1;
        return [500, "no"];
      });
    const complete = nock(API_HOST).post("/api/files.completeUploadExternal").reply(200, {});
    h.clock.set(DIGEST_AT);
    const report = await h.bot.scheduler.tick();
    expect(report.failed).toEqual([]);
    expect(uploads).toBe(1);
    expect(complete.isDone()).toBe(false);
    expect(posted).toHaveLength(1);
    expect(updated).toHaveLength(1);
    expect(contextTexts(updated[0].blocks)).toContain(CHART_MISSING_TEXT);
  });

  it("a chart that cannot be rendered is not uploaded; the digest says it is missing", async () => {
    // The real renderer on markup resvg rejects stands for any rendering failure.
    let rendered = 0;
    await start(() => {
      rendered += 1;
      return svgToPng("<svg this is not xml", { logger: h.logger });
    });
    const posted: Record<string, string>[] = [];
    const updated: Record<string, string>[] = [];
    chatApi(posted, updated);
    const upload = nock(API_HOST).post("/api/files.getUploadURLExternal").reply(200, {});
    h.clock.set(DIGEST_AT);
    const report = await h.bot.scheduler.tick();
    expect(report.failed).toEqual([]);
    expect(report.posted).toEqual([expect.objectContaining({ messageId: DIGEST_TS })]);
    expect(rendered).toBe(1);
    expect(upload.isDone()).toBe(false);
    expect(posted).toHaveLength(1);
    expect(contextTexts(posted[0].blocks)).toContain(CHART_MISSING_TEXT);
    expect(updated).toHaveLength(0);
    expect(h.logger.records.some((r) => r.message.startsWith("chart image failed"))).toBe(true);
  });
});
