/**
 * @module teams-platform
 * The Teams `ChatPlatform`: posts go out proactively through `CloudAdapter.continueConversationAsync`
 * with the channel's stored conversation reference (the bare channel id, so a digest is a new
 * top-level post), as one Adaptive Card; private answers go to the member's personal conversation,
 * opened with `createConversationAsync` when this process has none (the Bot Framework's way to
 * start a 1:1 from a team: learn.microsoft.com/microsoftteams/platform/bots/how-to/conversations/
 * send-proactive-messages). Every send passes the per-conversation `SendQueue`. A message's
 * chart is rendered here (the injected renderer, by default the card-sized indexed PNG) and goes
 * into the card as an image; when rendering fails the card says so and posts anyway.
 * `describeFailure` sorts a failed post for the scheduler: 429 or 412 left after the queue's
 * retries, or a refused connection, is "not sent" (after `Retry-After` when given); 400, 401, 403
 * and 404 (e.g. the bot was removed from the team) are "refused" with the status and Teams' error
 * code; a post with no stored conversation reference never started ("refused"); anything else
 * (502, 504, timeouts) is "unknown". The bot API lists no channel messages, so there is no
 * `findPost`: an unknown outcome is recorded as missed.
 */
import {
  type CloudAdapter,
  type ConversationParameters,
  type ConversationReference,
  TeamsInfo,
  type TurnContext,
} from "botbuilder";
import type { ChatPlatform, OutgoingMessage, PostFailure } from "../../src/ports/chat-platform.js";
import type { Logger } from "../../src/ports/logger.js";
import type { Store } from "../../src/ports/store.js";
import type { ChartRenderer } from "../chart-image.js";
import { platformConversationId } from "./activity-fields.js";
import { type CardChart, cardActivity } from "./adaptive-card.js";
import { cardChartRenderer } from "./card-chart.js";
import {
  type ConversationState,
  readConversationState,
  type StoredReference,
} from "./conversation-state.js";
import type { MemberDirectory } from "./member-directory.js";
import { isRetryable, retryAfterMs, type SendQueue, statusOf } from "./send-queue.js";

/** Answers that say Teams will not take this post as it is. */
const REFUSED_STATUSES = new Set([400, 401, 403, 404]);

/** Thrown when a channel has no stored conversation reference (nothing was sent). */
export class NoConversationError extends Error {
  constructor(channel: string) {
    super(
      `no conversation reference for ${channel}: add the plumbline app to that team or chat again`,
    );
    this.name = "NoConversationError";
  }
}

/** Teams' error code in a failed send's body (`{ error: { code } }`), if any. */
function teamsErrorCode(error: unknown): string | null {
  const body = (error as { response?: { parsedBody?: unknown; bodyAsText?: unknown } } | null)
    ?.response;
  let parsed: unknown = body?.parsedBody;
  if (parsed === undefined && typeof body?.bodyAsText === "string") {
    try {
      parsed = JSON.parse(body.bodyAsText);
    } catch {
      parsed = undefined;
    }
  }
  const code = (parsed as { error?: { code?: unknown } } | undefined)?.error?.code;
  return typeof code === "string" && /^[A-Za-z0-9_.-]{1,64}$/.test(code) ? code : null;
}

/** OAuth scope of the Bot Framework channel service (botframework-connector AuthenticationConstants). */
const CHANNEL_AUDIENCE = "https://api.botframework.com";

function sdkReference(
  reference: StoredReference,
  conversationId?: string,
): Partial<ConversationReference> {
  return {
    channelId: reference.channelId,
    serviceUrl: reference.serviceUrl,
    conversation: {
      id: conversationId ?? reference.conversation.id,
      name: "",
      isGroup: reference.conversation.isGroup ?? false,
      conversationType: reference.conversation.conversationType ?? "",
      ...(reference.conversation.tenantId ? { tenantId: reference.conversation.tenantId } : {}),
    },
    ...(reference.bot ? { bot: { id: reference.bot.id, name: reference.bot.name ?? "" } } : {}),
  };
}

export interface TeamsPlatformOptions {
  readonly adapter: CloudAdapter;
  /** The bot's app id; "" when authentication is off (development). */
  readonly appId: string;
  readonly queue: SendQueue;
  readonly directory: MemberDirectory;
  readonly logger: Logger;
  /** SVG → PNG for card images; default `cardChartRenderer`. */
  readonly renderChart?: ChartRenderer;
}

export class TeamsPlatform implements ChatPlatform {
  readonly name = "teams";
  private store: Store | null = null;
  private readonly personal = new Map<string, Partial<ConversationReference>>();
  private readonly renderChart: ChartRenderer;

  constructor(private readonly options: TeamsPlatformOptions) {
    this.renderChart = options.renderChart ?? cardChartRenderer({ logger: options.logger });
  }

  describeFailure(_channel: string, error: unknown): PostFailure {
    if (error instanceof NoConversationError) {
      return { outcome: "refused", reason: "no conversation reference" };
    }
    if (isRetryable(error)) {
      return { outcome: "not-sent", retryAfterMs: retryAfterMs(error, Date.now()) };
    }
    const status = statusOf(error);
    if (status !== null && REFUSED_STATUSES.has(status)) {
      const code = teamsErrorCode(error);
      return {
        outcome: "refused",
        reason: code === null ? `HTTP ${status}` : `HTTP ${status} ${code}`,
      };
    }
    return { outcome: "unknown" };
  }

  /** Gives the platform the bot's store (conversation references live there). */
  attach(store: Store): void {
    this.store = store;
  }

  private async state(channel: string): Promise<ConversationState> {
    if (this.store === null) throw new Error("the Teams platform is not started");
    const state = await readConversationState(this.store, channel);
    if (state === null) throw new NoConversationError(channel);
    return state;
  }

  /**
   * A proactive turn's activity carries a made-up id, which the SDK would turn into `replyToId`
   * (a reply to a message that does not exist); without it the post is a new top-level message.
   */
  private async sendProactive(context: TurnContext, message: OutgoingMessage): Promise<string> {
    context.activity.id = undefined;
    return this.sendInTurn(context, message);
  }

  /** Sends one message in the turn's conversation through the queue; resolves to its id. */
  async sendInTurn(context: TurnContext, message: OutgoingMessage | string): Promise<string> {
    const key = context.activity.conversation?.id ?? "";
    const activity =
      typeof message === "string"
        ? { type: "message", text: message }
        : cardActivity(message, this.cardChart(message));
    const response = await this.options.queue.send(key, () => context.sendActivity(activity));
    return response?.id ?? "";
  }

  /** The message's chart, rendered once before the send (so a retried send reuses it). */
  private cardChart(message: OutgoingMessage): CardChart | undefined {
    if (!message.chart) return undefined;
    let png: Buffer | null;
    try {
      png = this.renderChart(message.chart.svg);
    } catch (error) {
      this.options.logger.warn(
        { err: error instanceof Error ? error.name : "unknown" },
        "chart image failed; posting text bars only",
      );
      png = null;
    }
    return { png, alt: message.chart.alt };
  }

  async postToChannel(channel: string, message: OutgoingMessage): Promise<{ messageId: string }> {
    const { reference } = await this.state(channel);
    let messageId = "";
    await this.options.adapter.continueConversationAsync(
      this.options.appId,
      sdkReference(reference, platformConversationId(channel)),
      async (context) => {
        messageId = await this.sendProactive(context, message);
      },
    );
    return { messageId };
  }

  async postPrivately(channel: string, member: string, message: OutgoingMessage): Promise<void> {
    const state = await this.state(channel);
    const account = this.options.directory.accountOf(member) ?? (await this.lookUp(state, member));
    const reference = await this.personalReference(state, account);
    await this.options.adapter.continueConversationAsync(
      this.options.appId,
      reference,
      async (context) => {
        await this.sendProactive(context, message);
      },
    );
  }

  /** Answers one member privately from a turn in a team or group chat. */
  async answerPrivately(context: TurnContext, message: OutgoingMessage): Promise<void> {
    const activity = context.activity;
    const account = activity.from?.id;
    if (!account) throw new Error("the activity names no sender");
    const state: ConversationState = {
      reference: {
        channelId: activity.channelId,
        serviceUrl: activity.serviceUrl,
        conversation: { id: activity.conversation.id },
        bot: { id: activity.recipient.id, name: activity.recipient.name },
      },
      teamId: null,
      tenantId: activity.conversation.tenantId ?? "",
    };
    const reference = await this.personalReference(state, account);
    await this.options.adapter.continueConversationAsync(
      this.options.appId,
      reference,
      async (ctx) => {
        await this.sendProactive(ctx, message);
      },
    );
  }

  async displayName(member: string): Promise<string | null> {
    return this.options.directory.nameOf(member);
  }

  /** The member's channel account id from the conversation roster (Entra object id accepted). */
  private async lookUp(state: ConversationState, member: string): Promise<string> {
    let account: string | null = null;
    await this.options.adapter.continueConversationAsync(
      this.options.appId,
      sdkReference(state.reference),
      async (context) => {
        const found = await TeamsInfo.getMember(context, member);
        this.options.directory.learn(found);
        account = found.id ?? null;
      },
    );
    if (account === null) throw new Error("the roster did not name the member's account");
    return account;
  }

  private async personalReference(
    state: ConversationState,
    account: string,
  ): Promise<Partial<ConversationReference>> {
    const known = this.personal.get(account);
    if (known) return known;
    const bot = state.reference.bot ?? { id: "" };
    const parameters: ConversationParameters = {
      isGroup: false,
      bot: { id: bot.id, name: bot.name ?? "plumbline" },
      members: [{ id: account, name: "" }],
      tenantId: state.tenantId,
      channelData: { tenant: { id: state.tenantId } },
    };
    let reference: Partial<ConversationReference> | null = null;
    await this.options.adapter.createConversationAsync(
      this.options.appId,
      state.reference.channelId,
      state.reference.serviceUrl,
      CHANNEL_AUDIENCE,
      parameters,
      async (context) => {
        reference = {
          channelId: context.activity.channelId,
          serviceUrl: context.activity.serviceUrl,
          conversation: context.activity.conversation,
          bot: parameters.bot,
        };
      },
    );
    if (reference === null) throw new Error("Teams did not open a personal conversation");
    this.personal.set(account, reference);
    return reference;
  }
}
