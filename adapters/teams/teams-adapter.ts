/**
 * @module teams-adapter
 * `createTeamsAdapter`: the Microsoft Teams side of `plumbline serve`, on botbuilder 4.23
 * (`CloudAdapter` with `ConfigurationBotFrameworkAuthentication` over a
 * `ConfigurationServiceClientCredentialFactory`). Without app credentials the SDK silently turns
 * request authentication off, so the adapter refuses to start unless the explicit development flag
 * PLUMBLINE_TEAMS_DEV_NO_AUTH=1 is set, and then says so in a warning. The SDK's own HTTP retries
 * are switched off on every connector (they resend posts after a reset connection and sleep for
 * real); our `SendQueue` retries only what Teams certainly refused. Every botbuilder import of the
 * project lives in adapters/teams, so the archived SDK can be replaced in one place.
 */
import {
  CloudAdapter,
  ConfigurationBotFrameworkAuthentication,
  ConfigurationServiceClientCredentialFactory,
  type TurnContext,
} from "botbuilder";
import type { TeamsConfig } from "../../src/config/load-config.js";
import { PlumblineError } from "../../src/domain/errors.js";
import type { Logger } from "../../src/ports/logger.js";
import type { ChartRenderer } from "../chart-image.js";
import type { Bot } from "../create-bot.js";
import type { PlatformAdapter } from "../platform-adapter.js";
import { TEAMS_CHANNEL_PREFIX } from "./activity-fields.js";
import { MemberDirectory } from "./member-directory.js";
import { messagesRoute } from "./messages-route.js";
import { disableSdkRetries } from "./sdk-retries.js";
import { SendQueue, type SendQueueOptions } from "./send-queue.js";
import { PlumblineTeamsHandler } from "./teams-handler.js";
import { TeamsPlatform } from "./teams-platform.js";

export interface TeamsAdapterOptions {
  /** Null: no credentials (only allowed with `devNoAuth`). */
  readonly config: TeamsConfig | null;
  /** PLUMBLINE_TEAMS_DEV_NO_AUTH=1: accept unauthenticated requests (development only). */
  readonly devNoAuth: boolean;
  readonly logger: Logger;
  /** Overrides of the send queue's pacing, clock and sleep (tests). */
  readonly sendQueue?: Partial<SendQueueOptions>;
  /** Epoch ms for activities without a timestamp; default Date.now. */
  readonly now?: () => number;
  /** SVG → PNG for the digest's card image; default the card-sized indexed PNG (tests inject). */
  readonly renderChart?: ChartRenderer;
}

function credentialFactory(
  config: TeamsConfig | null,
): ConfigurationServiceClientCredentialFactory {
  if (config === null) return new ConfigurationServiceClientCredentialFactory({});
  return new ConfigurationServiceClientCredentialFactory({
    MicrosoftAppId: config.appId,
    MicrosoftAppType: config.appType,
    ...(config.appPassword !== null ? { MicrosoftAppPassword: config.appPassword } : {}),
    ...(config.tenantId !== null ? { MicrosoftAppTenantId: config.tenantId } : {}),
  });
}

/** The Teams adapter; throws CONFIG_INVALID when there are no credentials and no dev flag. */
export async function createTeamsAdapter(options: TeamsAdapterOptions): Promise<PlatformAdapter> {
  const { config, logger } = options;
  if (config === null && !options.devNoAuth) {
    throw new PlumblineError(
      "CONFIG_INVALID",
      "Teams needs app credentials: without them the Bot Framework SDK accepts unauthenticated requests",
      {
        hint: "set MICROSOFT_APP_ID, MICROSOFT_APP_PASSWORD and MICROSOFT_APP_TENANT_ID (or PLUMBLINE_TEAMS_DEV_NO_AUTH=1 for local development only)",
      },
    );
  }
  if (config === null) {
    logger.warn(
      { setting: "PLUMBLINE_TEAMS_DEV_NO_AUTH" },
      "TEAMS AUTHENTICATION IS OFF: /api/messages accepts unauthenticated requests. Development only; never expose this server.",
    );
  } else if (options.devNoAuth) {
    logger.warn(
      { setting: "PLUMBLINE_TEAMS_DEV_NO_AUTH" },
      "Teams credentials are set, so the development flag is ignored",
    );
  }
  const auth = new ConfigurationBotFrameworkAuthentication({}, credentialFactory(config));
  const adapter = new CloudAdapter(auth);
  adapter.use({
    async onTurn(context: TurnContext, next: () => Promise<void>) {
      disableSdkRetries(context.turnState.get(context.adapter.ConnectorClientKey));
      await next();
    },
  });
  adapter.onTurnError = async (_context, error) => {
    logger.error({ error: error instanceof Error ? error.name : "unknown" }, "teams turn failed");
    throw error;
  };
  const now = options.now ?? Date.now;
  const queue = new SendQueue({
    now,
    sleep: (ms) => new Promise((resolve) => setTimeout(resolve, ms)),
    ...options.sendQueue,
  });
  const directory = new MemberDirectory();
  const platform = new TeamsPlatform({
    adapter,
    appId: config?.appId ?? "",
    queue,
    directory,
    logger,
    ...(options.renderChart ? { renderChart: options.renderChart } : {}),
  });
  const handler = new PlumblineTeamsHandler({ platform, directory, logger, now });
  return {
    name: "teams",
    channelPrefix: TEAMS_CHANNEL_PREFIX,
    platform,
    routes: [
      messagesRoute({
        adapter,
        authenticate: (activity, header) => auth.authenticateRequest(activity, header),
        logic: (context) => handler.run(context),
        logger,
        now,
      }),
    ],
    async start(bot: Bot) {
      platform.attach(bot.store);
      handler.attach(bot);
      logger.info({ auth: config !== null }, "teams adapter ready on /api/messages");
    },
    async stop() {},
  };
}
