/**
 * @module clock
 * Time is injected: the bot, the scheduler and the console read "now" from a `Clock`, so tests run
 * weeks of schedule in milliseconds and never sleep.
 */

export interface Clock {
  /** Epoch milliseconds. */
  now(): number;
}

export const systemClock: Clock = { now: () => Date.now() };

/** A clock that moves only when told: tests and the console's `:clock +7d`. */
export class ManualClock implements Clock {
  private current: number;

  constructor(start: number) {
    this.current = start;
  }

  now(): number {
    return this.current;
  }

  set(at: number): void {
    this.current = at;
  }

  advance(ms: number): void {
    this.current += ms;
  }
}
