// The fast-check seed of a fuzz or property test file: STRATA_FC_SEED when set (to replay a run),
// a fixed seed under CI, a fresh one locally; printed first so that even a run that dies can be replayed.

import fc from "fast-check";
import { fileSeed } from "../support/fc-seed.js";

/** Configures fast-check for this test file and prints its seed; returns the seed. */
export function useSeed(name: string, ciSeed: number): number {
  const seed = fileSeed(ciSeed);
  fc.configureGlobal({ seed });
  process.stderr.write(`${name}: fast-check seed ${seed}\n`);
  return seed;
}
