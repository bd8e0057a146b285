// The shared fast-check seed: replayable (STRATA_FC_SEED), fixed in CI, random locally, and the
// global seed of every test file.

import { describe, expect, inject, it } from "vitest";
import fc from "fast-check";
import { chooseSeed, CI_SEED, fcParams, fcSeed, fileSeed } from "./fc-seed.js";

describe("fast-check seed", () => {
  it("STRATA_FC_SEED replays a run, CI fixes the seed, otherwise it is random", () => {
    expect(chooseSeed({ STRATA_FC_SEED: "12345", CI: "true" })).toBe(12345);
    expect(chooseSeed({ CI: "true" })).toBe(CI_SEED);
    expect(chooseSeed({ CI: "1" })).toBe(CI_SEED);
    const local = new Set(Array.from({ length: 5 }, () => chooseSeed({})));
    expect(local.size).toBeGreaterThan(1);
    for (const s of local) expect(Number.isSafeInteger(s) && s >= 0).toBe(true);
    expect(() => chooseSeed({ STRATA_FC_SEED: "abc" })).toThrow(/STRATA_FC_SEED/);
    // A file with its own CI seed: that seed in CI, the run's seed locally, STRATA_FC_SEED always wins.
    expect(fileSeed(7, { CI: "true" })).toBe(7);
    expect(fileSeed(7, { CI: "true", STRATA_FC_SEED: "99" })).toBe(99);
    expect(fileSeed(7, {})).toBe(fcSeed());
  });

  it("every test file starts with the run's seed as fast-check's global seed", () => {
    const seed = inject("fcSeed");
    expect(fc.readConfigureGlobal().seed).toBe(seed);
    expect(fcSeed()).toBe(seed);
    expect(fcParams({ numRuns: 3 })).toEqual({ seed, numRuns: 3 });
    // Same seed, same values: a failure seen once is seen again.
    const arb = fc.array(fc.integer(), { minLength: 5, maxLength: 5 });
    expect(fc.sample(arb, { seed, numRuns: 3 })).toEqual(fc.sample(arb, { seed, numRuns: 3 }));
  });
});
