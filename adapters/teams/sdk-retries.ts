/**
 * @module sdk-retries
 * Removes the HTTP retry policy from a botbuilder connector client. The connector is built on
 * `@azure/core-client`, whose default pipeline retries 5xx answers and reset or timed-out
 * connections with real sleeps (`@typespec/ts-http-runtime` 0.3 `exponentialRetryStrategy`); for a
 * POST that may resend a message Teams already showed. Pipelines remove a phase with
 * `removePolicy({ phase: "Retry" })` (`@azure/core-rest-pipeline` `Pipeline`). The client object is
 * reached through the connector's (undocumented) `client` field, checked at run time.
 */

interface PipelineLike {
  removePolicy(options: { phase?: string }): unknown;
}

function pipelineOf(connector: unknown): PipelineLike | null {
  if (typeof connector !== "object" || connector === null) return null;
  const client = (connector as { client?: unknown }).client;
  if (typeof client !== "object" || client === null) return null;
  const pipeline = (client as { pipeline?: unknown }).pipeline;
  if (typeof pipeline !== "object" || pipeline === null) return null;
  const remove = (pipeline as { removePolicy?: unknown }).removePolicy;
  return typeof remove === "function" ? (pipeline as PipelineLike) : null;
}

const done = new WeakSet<object>();

/** True when the connector's retry phase is (now) gone; false when its shape is not known. */
export function disableSdkRetries(connector: unknown): boolean {
  const pipeline = pipelineOf(connector);
  if (pipeline === null) return false;
  if (!done.has(pipeline)) {
    pipeline.removePolicy({ phase: "Retry" });
    done.add(pipeline);
  }
  return true;
}
