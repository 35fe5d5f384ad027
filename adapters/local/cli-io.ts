/**
 * @module cli-io
 * What a CLI command may touch: output streams, the environment and the working directory, all
 * passed in so tests run commands in-process.
 */

export interface CliIo {
  readonly stdout: (text: string) => void;
  readonly stderr: (text: string) => void;
  readonly env: Readonly<Record<string, string | undefined>>;
  readonly cwd: string;
  /** Monotonic ms for progress lines; without it (tests) no progress line is written. */
  readonly now?: () => number;
  /** Wall-clock epoch ms (ingest's delivery stamps, purge's default time); default Date.now. */
  readonly clock?: () => number;
  /** Standard input, for the console; absent in tests that do not type. */
  readonly stdin?: NodeJS.ReadableStream & { readonly isTTY?: boolean };
}
