// Limits on one compilation: how many states each construction may make, how many alpha cases a
// rule may have, and a time limit (CPU time, see `Budget`) and heap budget for the whole compile. Every limit
// counts what it limits and ends in a CompileLimitError naming the part responsible, which the
// compiler turns into a positioned `compile/too-large` at the rule (DEVELOPERS.md, "Limits").

import { FstLimitError } from "../fst/index.js";

/** The limits of one compilation; every field has a default (DEFAULT_LIMITS). */
export interface CompileLimits {
  /** States of one rule's alignment construction, counting the states of multi-symbol outputs. */
  readonly ruleStates: number;
  /** States of one context recogniser (a left or right context as a DFA). */
  readonly contextStates: number;
  /** States of the subset construction when a step's machine is determinised and minimised. */
  readonly machineStates: number;
  /** Alpha-variable assignments × environments one rule lowers to (its cases). */
  readonly ruleCases: number;
  /**
   * Milliseconds for the whole compilation (steps, composition, freezing), counted as the process's
   * CPU time (user + system, all its threads) or the wall-clock time, whichever is less.
   */
  readonly deadlineMs: number;
  /** Bytes the JavaScript heap may grow by during the compilation. */
  readonly heapBytes: number;
}

export const DEFAULT_LIMITS: CompileLimits = {
  ruleStates: 200_000,
  contextStates: 20_000,
  machineStates: 500_000,
  ruleCases: 4096,
  deadlineMs: 30_000,
  heapBytes: 1024 * 1024 * 1024,
};

export type LimitKind = "states" | "cases" | "time" | "memory";

/** A limit was reached; `part` says what was being built ("the context recogniser of environment 2"). */
export class CompileLimitError extends Error {
  constructor(
    readonly kind: LimitKind,
    readonly part: string,
    readonly limit: number,
  ) {
    super(`${part}: ${describe(kind, limit)}`);
    this.name = "CompileLimitError";
  }
}

const fmt = (n: number): string => n.toLocaleString("en-US");

/** "more than 200,000 states", "the 30 s time limit", … */
export function describe(kind: LimitKind, limit: number): string {
  switch (kind) {
    case "states":
      return `more than ${fmt(limit)} states`;
    case "cases":
      return `more than ${fmt(limit)} cases (alpha assignments × environments)`;
    case "time":
      return limit < 1000 ? `the time limit of ${Math.round(limit)} ms` : `the time limit of ${+(limit / 1000).toFixed(1)} s`;
    case "memory":
      return `the memory limit of ${Math.round(limit / (1024 * 1024))} MiB`;
  }
}

/** CPU time of this process (user + system, every thread), in milliseconds. */
const cpuMs = (): number => {
  const u = process.cpuUsage();
  return (u.user + u.system) / 1000;
};

/**
 * The clock and heap side of the limits, shared by every construction of one compilation. `tick`
 * is cheap (a counter); every 256 ticks it reads the clocks, every 4 096 the heap. `part` names
 * what is being built, for the message.
 *
 * Time is the work done: the process's CPU time since the budget began, so that waiting for a
 * core on a loaded machine does not count; but never more than the wall-clock time, so that other
 * threads of the process working alongside (a worker pool transcribing) cannot bring the limit on
 * sooner than the clock would. The limit is reached when both have passed it.
 */
export class Budget {
  readonly limits: CompileLimits;
  private readonly wallStart: number;
  private readonly cpuStart: number;
  private readonly heapStart: number;
  private n = 0;
  /** What is being built, for messages. */
  part = "the grammar";
  /** The step (index into the grammar's steps) being built or composed, -1 when none. */
  step = -1;

  constructor(limits: Partial<CompileLimits> = {}) {
    this.limits = { ...DEFAULT_LIMITS, ...limits };
    this.wallStart = performance.now();
    this.cpuStart = cpuMs();
    this.heapStart = process.memoryUsage().heapUsed;
  }

  /** Throws CompileLimitError when the deadline has passed or the heap grew past its budget. */
  readonly tick = (): void => {
    const n = ++this.n;
    if ((n & 255) !== 0) return;
    // The CPU clock is read only once the wall clock has passed the limit.
    if (performance.now() - this.wallStart > this.limits.deadlineMs && this.elapsedMs() > this.limits.deadlineMs) throw new CompileLimitError("time", this.part, this.limits.deadlineMs);
    if ((n & 4095) === 0 && process.memoryUsage().heapUsed - this.heapStart > this.limits.heapBytes)
      throw new CompileLimitError("memory", this.part, this.limits.heapBytes);
  };

  /** Milliseconds counted against the time limit: the process's CPU time or the wall-clock time since the start, whichever is less. */
  elapsedMs(): number {
    return Math.min(performance.now() - this.wallStart, cpuMs() - this.cpuStart);
  }

  /** Runs `f` with `part` named as what is being built (restored afterwards); a state limit of the fst algebra is reported as this part's. */
  within<T>(part: string, f: () => T): T {
    const before = this.part;
    this.part = part;
    try {
      return f();
    } catch (e) {
      if (e instanceof FstLimitError) throw new CompileLimitError("states", part, e.limit);
      throw e;
    } finally {
      this.part = before;
    }
  }
}

/** A budget with no clock or heap limit (for callers that build one machine on their own). */
export const unbounded = (): Budget => new Budget({ deadlineMs: Infinity, heapBytes: Infinity });
