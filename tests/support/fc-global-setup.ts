// vitest global setup: chooses the run's fast-check seed once and prints it, so any failure can be
// replayed with STRATA_FC_SEED=<seed> npm test.

import type { TestProject } from "vitest/node";
import { chooseSeed } from "./fc-seed.js";

declare module "vitest" {
  export interface ProvidedContext {
    fcSeed: number;
  }
}

export default function setup(project: TestProject): void {
  const seed = chooseSeed();
  process.stderr.write(`fast-check seed ${seed} (replay: STRATA_FC_SEED=${seed} npm test)\n`);
  project.provide("fcSeed", seed);
}
