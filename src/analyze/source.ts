// The underlying form behind a witness: the shortest input word whose derivation (some variant of
// every earlier step) brings a given string to step k, found by composing the earlier steps
// backwards onto that one string and searching the result against the input words.

import { acceptorOf, compose, trim, type Fst } from "../fst/index.js";
import { guarded, type Dfa } from "./dfa.js";
import { shortestString } from "./search.js";
import type { StepMachines } from "./steps.js";

/** The shortest w among `words` with x ∈ (V_{k-1} ∘ … ∘ V_0)(w); null when there is none. */
export function sourceOf(steps: readonly StepMachines[], k: number, x: readonly number[], words: Dfa, limit: number): number[] | null {
  let t: Fst = acceptorOf(x);
  for (let j = k - 1; j >= 0; j--) {
    const m = steps[j]!.variants;
    t = guarded("the search for an underlying form", limit, () => trim(compose(m, t, { maxStates: limit })));
  }
  return shortestString([{ dfa: words, member: true }], { machine: t, output: [] }, words.size, limit, "the search for an underlying form");
}
