/**
 * @module report-route
 * `GET /reports/<token>` on the bot's HTTP server: the report page of one channel for the member a
 * signed link was made for (`/influence report`). The token (src/report/report-token.ts) carries
 * channel, reader and expiry under the server secret; a forged, tampered or expired one gets a
 * plain 403 page that says only how to get a new link. The page is analysed at request time with
 * the channel's settings and named by the naming rules for that reader: named figures while the
 * reader is a facilitator (configured or added), the channel's `names` setting otherwise, and the
 * reader always sees themself. Responses are never cached and forbid every fetch (CSP).
 */
import type { IncomingMessage, ServerResponse } from "node:http";
import { readChannelSettings } from "../src/commands/channel-settings-store.js";
import { namingPolicy, readerId } from "../src/commands/member-view.js";
import { analysisSettingsFor } from "../src/domain/channel-settings.js";
import type { Clock } from "../src/ports/clock.js";
import { type Logger, silentLogger } from "../src/ports/logger.js";
import type { Store } from "../src/ports/store.js";
import { analyzeForPage } from "../src/report/charts/page-analysis.js";
import { escapeXml } from "../src/report/charts/svg.js";
import { REPORT_PAGE_CSP, reportPage } from "../src/report/report-page.js";
import { signReportToken, verifyReportToken } from "../src/report/report-token.js";
import type { HttpRoute } from "./platform-adapter.js";

/** Paths this route answers start with this prefix. */
export const REPORTS_PREFIX = "/reports/";

export interface ReportRouteDeps {
  readonly store: Store;
  /** Server secret for the HMAC (at least 16 characters; keep it out of the database). */
  readonly secret: string;
  readonly clock: Clock;
  /** Public base URL of the bot's HTTP server, e.g. "https://bot.example.org"; links are relative without it. */
  readonly publicUrl?: string;
  /** Platform ids configured as facilitators everywhere (`PLUMBLINE_FACILITATORS`). */
  readonly facilitators?: readonly string[];
  readonly displayName?: (platformId: string) => Promise<string | null>;
  readonly logger?: Logger;
}

export interface ReportRoute extends HttpRoute {
  /** The route matches every path that starts with `path` (prefix routing). */
  readonly prefix: true;
  /** A fresh 24-hour link to the channel's report for `reader` (a platform id). */
  linkFor(channel: string, reader: string): string;
}

const SECURITY_HEADERS = {
  "Content-Security-Policy": REPORT_PAGE_CSP,
  "Cache-Control": "no-store",
  "Referrer-Policy": "no-referrer",
  "X-Content-Type-Options": "nosniff",
  "X-Frame-Options": "DENY",
} as const;

function plainPage(response: ServerResponse, status: number, title: string, message: string): void {
  const body = `<!doctype html><html lang="en"><head><meta charset="utf-8"><meta name="viewport" content="width=device-width, initial-scale=1"><title>${escapeXml(title)}</title></head><body style="font-family:system-ui,sans-serif;max-width:40em;margin:2em auto;padding:0 1em"><h1>${escapeXml(title)}</h1><p>${escapeXml(message)}</p></body></html>\n`;
  response.writeHead(status, {
    ...SECURITY_HEADERS,
    "Content-Type": "text/html; charset=utf-8",
    "Content-Length": Buffer.byteLength(body),
  });
  response.end(body);
}

function utc(ms: number): string {
  return `${new Date(ms).toISOString().replace("T", " ").slice(0, 16)} UTC`;
}

/** The `/reports/<token>` handler for the bot's HTTP server. */
export function createReportRoute(deps: ReportRouteDeps): ReportRoute {
  const logger = deps.logger ?? silentLogger;
  const facilitators = deps.facilitators ?? [];
  const base = (deps.publicUrl ?? "").replace(/\/+$/, "");
  return {
    path: REPORTS_PREFIX,
    prefix: true,
    linkFor(channel, reader) {
      const token = signReportToken({
        channel,
        reader,
        now: deps.clock.now(),
        secret: deps.secret,
      });
      return `${base}${REPORTS_PREFIX}${token}`;
    },
    async handle(request: IncomingMessage, response: ServerResponse): Promise<void> {
      if (request.method !== "GET" && request.method !== "HEAD") {
        response.writeHead(405, {
          Allow: "GET, HEAD",
          "Content-Type": "text/plain; charset=utf-8",
        });
        response.end("Method not allowed\n");
        return;
      }
      const path = new URL(request.url ?? "/", "http://localhost").pathname;
      const token = path.startsWith(REPORTS_PREFIX) ? path.slice(REPORTS_PREFIX.length) : "";
      const now = deps.clock.now();
      const check = verifyReportToken(token, { secret: deps.secret, now });
      if (!check.ok) {
        logger.info({ reason: check.reason }, "report link refused");
        plainPage(
          response,
          403,
          "This report link does not work",
          "The link has expired or is not valid. Report links work for 24 hours: ask for a new one with /influence report in the channel.",
        );
        return;
      }
      const { channel, reader, expiresAt } = check.claims;
      try {
        const settings = await readChannelSettings(deps.store, channel);
        const snapshot = await deps.store.loadSnapshot(channel);
        const analysis = analyzeForPage(snapshot, analysisSettingsFor(settings), { until: now });
        const facilitator =
          facilitators.includes(reader) || (await deps.store.isFacilitator(channel, reader));
        const commandDeps = {
          store: deps.store,
          facilitators,
          ...(deps.displayName ? { displayName: deps.displayName } : {}),
        };
        const policy = await namingPolicy({
          report: analysis.report,
          deps: commandDeps,
          namesOn: facilitator || settings.names,
          reader: { id: readerId(deps.store, snapshot, reader), platformId: reader },
          disclosure: { snapshot, minMembers: settings.minMembers, facilitator },
        });
        const html = reportPage({
          ...analysis,
          policy,
          generatedAt: now,
          audience: `Shown only to you. This link stops working at ${utc(expiresAt)}; anyone you forward it to sees this page until then.`,
        });
        response.writeHead(200, {
          ...SECURITY_HEADERS,
          "Content-Type": "text/html; charset=utf-8",
          "Content-Length": Buffer.byteLength(html),
        });
        response.end(request.method === "HEAD" ? undefined : html);
      } catch (error) {
        logger.error(
          { err: error instanceof Error ? error.message : String(error) },
          "report page failed",
        );
        plainPage(
          response,
          500,
          "The report could not be made",
          "Try again in a minute; if it keeps failing, tell the bot's operator.",
        );
      }
    },
  };
}
