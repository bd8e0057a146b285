// The compile time limit counts work, not waiting: the process's CPU time, capped by the wall clock.

import { describe, expect, it } from "vitest";
import { Budget, CompileLimitError } from "../../src/compile/budget.js";

/** Calls tick often enough that it reads the clocks (every 256 calls). */
const ticks = (b: Budget): void => { for (let k = 0; k < 512; k++) b.tick(); };

describe("the compile time limit", () => {
  it("waiting (a thread asleep, as on a loaded machine) does not count; working does", () => {
    const b = new Budget({ deadlineMs: 40 });
    // 120 ms of wall-clock time with almost no CPU time: within the limit.
    Atomics.wait(new Int32Array(new SharedArrayBuffer(4)), 0, 0, 120);
    expect(b.elapsedMs()).toBeLessThan(40);
    ticks(b);
    // Working past 40 ms of CPU time reaches it, as a time limit naming the part being built.
    b.part = "the busy part";
    let caught: unknown;
    const start = performance.now();
    try {
      while (performance.now() - start < 5000) ticks(b);
    } catch (e) {
      caught = e;
    }
    expect(caught).toBeInstanceOf(CompileLimitError);
    expect((caught as CompileLimitError).kind).toBe("time");
    expect((caught as CompileLimitError).part).toBe("the busy part");
  });

});
