// One fast-check seed per test run: STRATA_FC_SEED when set (to replay a failure), a fixed seed when
// CI is set (so a CI run fails only on what changed), a fresh random seed locally (to explore).
// vitest.config.ts chooses it once (fc-global-setup.ts prints it) and every test file starts with
// it as fast-check's global seed (fc-setup.ts), so every fc.assert in tests/ runs with it.

import { randomInt } from "node:crypto";
import type fc from "fast-check";

/** CI's seed (the one the differential test has used in CI since it was written). */
export const CI_SEED = 882545925;

/** The seed for a run, from the environment. */
export function chooseSeed(env: NodeJS.ProcessEnv = process.env): number {
  const given = env["STRATA_FC_SEED"];
  if (given !== undefined && given !== "") {
    const n = Number(given);
    if (!Number.isSafeInteger(n)) throw new Error(`STRATA_FC_SEED must be a whole number, not '${given}'`);
    return n;
  }
  if (env["CI"] !== undefined && env["CI"] !== "" && env["CI"] !== "false") return CI_SEED;
  return randomInt(2 ** 31 - 1);
}

let seed: number | undefined;

/** The run's seed (the global setup's choice inside vitest; chosen here otherwise). */
export function fcSeed(): number {
  seed ??= chooseSeed();
  return seed;
}

/** Used by fc-setup.ts to adopt the seed the global setup chose. */
export function adoptSeed(s: number): void {
  seed = s;
}

/**
 * The seed for a test file that keeps its own fixed CI seed (the fuzz suite): STRATA_FC_SEED when
 * set, `ciSeed` under CI, else the run's seed (so the one seed printed first replays it too).
 */
export function fileSeed(ciSeed: number, env: NodeJS.ProcessEnv = process.env): number {
  const given = env["STRATA_FC_SEED"];
  if ((given === undefined || given === "") && env["CI"] !== undefined && env["CI"] !== "" && env["CI"] !== "false") return ciSeed;
  return given !== undefined && given !== "" ? chooseSeed(env) : fcSeed();
}

/** fast-check parameters with the run's seed, for a test that passes its own parameters. */
export function fcParams<T>(extra: fc.Parameters<T> = {}): fc.Parameters<T> {
  return { seed: fcSeed(), ...extra };
}
