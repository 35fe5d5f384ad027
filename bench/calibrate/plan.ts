/**
 * @module plan
 * The calibration grid and its options: regimes × decay × n × N/n, channels per cell, seed, output
 * format, workers. Default channel counts (`defaultChannels`): 40 a cell up to 60 members, 16 at
 * 200, 6 at 1,000, and more for leader cells where channels are cheap (fewer channels mean a wider
 * binomial error; the table prints its counts and the leader rate's Wilson interval). Parsing is strict: a bad option is a
 * `PlumblineError` with a hint, and the run does not start.
 */
import { PlumblineError } from "../../src/domain/errors.js";
import { DEFAULT_SETTINGS } from "../../src/domain/settings.js";
import { type ChannelJob, DECAYS, type Decay } from "./measure-channel.js";
import { REGIMES, type Regime } from "./true-matrix.js";

export const SIZES: readonly number[] = [8, 20, 60, 200, 1000];
export const RATIOS: readonly number[] = [5, 15, 50];

/**
 * Channels per cell when `--channels` is not given. Leader cells get more where channels are cheap:
 * their verdict is a rate over channels, and a leader interval whose true coverage is 90% shows
 * < 85% by chance alone in 10% of cells with 40 channels, 5% with 80 and 1% with 200 (binomial
 * distribution function, computed with scipy.stats.binom). Everything else keeps 40 (n ≤ 60), 16 (n = 200), 6 (n = 1,000).
 */
export function defaultChannels(n: number, regime?: Regime): number {
  const leaderCell = regime === "leader" || regime === "leader-low";
  if (n >= 1000) return 6;
  if (n >= 200) return 16;
  if (leaderCell) return n <= 20 ? 200 : 80;
  return 40;
}

/** The defaults of `defaultChannels` in words (the run's header and `--help`). */
export const DEFAULT_CHANNELS_TEXT =
  "40 (n ≤ 60; leader cells 200 up to n = 20, 80 at n = 60), 16 (n = 200), 6 (n = 1000)";

export type OutputFormat = "text" | "markdown" | "json";

export interface CalibrationPlan {
  readonly regimes: readonly Regime[];
  readonly decays: readonly Decay[];
  readonly sizes: readonly number[];
  readonly ratios: readonly number[];
  /** Channels per cell; null = `defaultChannels(n, regime)`. */
  readonly channels: number | null;
  readonly seed: number;
  readonly format: OutputFormat;
  readonly workers: number;
  readonly shrinkage: boolean;
  /** Exit 1 when a cell misses the floor. */
  readonly strict: boolean;
  /** Settings replacing the product defaults in every analysis (`--set key=value`). */
  readonly overrides: Readonly<Record<string, number | string | boolean | null>>;
  /** Print saved `--json` runs (merged) instead of running. */
  readonly from: readonly string[];
}

export const USAGE = `npm run calibrate -- [options]
  --regimes LIST   ${REGIMES.join(",")} (default: all)
  --decay LIST     decay,none (default: both; decay = half-life 14 days, none = half-life 0)
  --n LIST         members per channel, from ${SIZES.join(",")} or any integer ≥ 8 (default: ${SIZES.join(",")})
  --ratio LIST     signals per member N/n (default: ${RATIOS.join(",")})
  --channels K     channels per cell (default: ${DEFAULT_CHANNELS_TEXT})
  --seed S         suite seed, an integer (default 1)
  --workers W      child processes (default: 2, or 1 on a one-core machine)
  --set KEY=VALUE  replace a product default in every analysis, e.g. --set background=4 (repeatable)
  --no-shrinkage   leave out the point estimate at the expected counts
  --markdown       print the table in the format of docs/calibration.md
  --json           print the cells as JSON
  --strict         exit 1 when a cell misses the floor
  --from A,B       print saved --json runs again, merged (with --markdown: the table of docs/calibration.md)`;

function bad(message: string, code: "ARG_BAD_VALUE" | "ARG_UNKNOWN" = "ARG_BAD_VALUE"): never {
  throw new PlumblineError(code, message, {
    hint: `run \`npm run calibrate -- --help\` for the options`,
  });
}

function integers(flag: string, text: string | undefined, min: number): number[] {
  if (text === undefined || text === "") bad(`${flag} needs a value`);
  return text.split(",").map((part) => {
    const value = Number(part);
    if (!Number.isInteger(value) || value < min) {
      bad(`${flag} takes integers ≥ ${min}, got "${part}"`);
    }
    return value;
  });
}

function choices<T extends string>(flag: string, text: string | undefined, allowed: readonly T[]) {
  if (text === undefined || text === "") bad(`${flag} needs a value`);
  return text.split(",").map((part) => {
    if (!(allowed as readonly string[]).includes(part)) {
      bad(`${flag} takes ${allowed.join(", ")}; got "${part}"`);
    }
    return part as T;
  });
}

/** A `--set` value: a number, true/false, null, or else the text itself (e.g. "auto"). */
function parseSettingValue(raw: string): number | string | boolean | null {
  if (raw === "true" || raw === "false") return raw === "true";
  if (raw === "null") return null;
  const value = Number(raw);
  return raw.trim() !== "" && Number.isFinite(value) ? value : raw;
}

/** Parses the command line (without `node` and the script). `help` is true for --help. */
export function parsePlan(
  args: readonly string[],
  cores: number,
): { plan: CalibrationPlan; help: boolean } {
  let regimes: readonly Regime[] = REGIMES;
  let decays: readonly Decay[] = DECAYS;
  let sizes: readonly number[] = SIZES;
  let ratios: readonly number[] = RATIOS;
  let channels: number | null = null;
  let seed = 1;
  let format: OutputFormat = "text";
  let workers = Math.max(1, Math.min(2, cores));
  let shrinkage = true;
  let strict = false;
  let help = false;
  let from: readonly string[] = [];
  const overrides: Record<string, number | string | boolean | null> = {};
  for (let k = 0; k < args.length; k++) {
    const flag = args[k];
    const value = () => args[++k];
    switch (flag) {
      case "--regimes":
        regimes = choices(flag, value(), REGIMES);
        break;
      case "--decay":
        decays = choices(flag, value(), DECAYS);
        break;
      case "--n":
        sizes = integers(flag, value(), 8);
        break;
      case "--ratio":
        ratios = integers(flag, value(), 1);
        break;
      case "--channels":
        [channels] = integers(flag, value(), 1);
        break;
      case "--seed":
        [seed] = integers(flag, value(), 0);
        break;
      case "--workers":
        [workers] = integers(flag, value(), 1);
        break;
      case "--set": {
        const text = value() ?? "";
        const [key, raw] = [text.slice(0, text.indexOf("=")), text.slice(text.indexOf("=") + 1)];
        if (!text.includes("=") || !(key in DEFAULT_SETTINGS)) {
          bad(
            `--set takes KEY=VALUE with KEY one of ${Object.keys(DEFAULT_SETTINGS).join(", ")}; got "${text}"`,
          );
        }
        overrides[key] = parseSettingValue(raw);
        break;
      }
      case "--no-shrinkage":
        shrinkage = false;
        break;
      case "--markdown":
        format = "markdown";
        break;
      case "--json":
        format = "json";
        break;
      case "--strict":
        strict = true;
        break;
      case "--from": {
        const path = value();
        if (path === undefined || path === "") bad("--from needs the path of a saved --json run");
        from = path.split(",");
        break;
      }
      case "--help":
      case "-h":
        help = true;
        break;
      default:
        bad(`unknown option "${flag}"`, "ARG_UNKNOWN");
    }
  }
  return {
    plan: {
      regimes,
      decays,
      sizes,
      ratios,
      channels,
      seed,
      format,
      workers,
      shrinkage,
      strict,
      overrides,
      from,
    },
    help,
  };
}

/**
 * The jobs of a plan, one per simulated channel (each analysed under every decay setting), in a
 * fixed order; expensive channels first so the workers finish together.
 */
export function planJobs(plan: CalibrationPlan): ChannelJob[] {
  const jobs: ChannelJob[] = [];
  for (const n of plan.sizes) {
    for (const ratio of plan.ratios) {
      for (const regime of plan.regimes) {
        const count = plan.channels ?? defaultChannels(n, regime);
        for (let index = 0; index < count; index++) {
          jobs.push({
            regime,
            n,
            ratio,
            index,
            seed: plan.seed,
            decays: plan.decays,
            shrinkage: plan.shrinkage,
            overrides: plan.overrides,
          });
        }
      }
    }
  }
  const cost = (job: ChannelJob) => job.n * (job.ratio + 10);
  return jobs
    .map((job, order) => ({ job, order }))
    .sort((a, b) => cost(b.job) - cost(a.job) || a.order - b.order)
    .map(({ job }) => job);
}

/** Cell key shared by results and summaries. */
export function cellKey(cell: { regime: Regime; decay: Decay; n: number; ratio: number }): string {
  return `${cell.regime}|${cell.decay}|${cell.n}|${cell.ratio}`;
}

/** Cells of a plan in table order: n, then N/n, then regime, then decay. */
export function planCells(
  plan: CalibrationPlan,
): { regime: Regime; decay: Decay; n: number; ratio: number }[] {
  const cells: { regime: Regime; decay: Decay; n: number; ratio: number }[] = [];
  for (const n of plan.sizes) {
    for (const ratio of plan.ratios) {
      for (const regime of plan.regimes) {
        for (const decay of plan.decays) cells.push({ regime, decay, n, ratio });
      }
    }
  }
  return cells;
}
