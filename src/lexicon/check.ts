// Cross-check of a whole lexicon: the compiled engine against the reference interpreter, entry by
// entry (narrow form and the set of variants), for `strata build --check` and the tests.

import type { Inventory } from "../inventory/types.js";
import type { Engine } from "./engine.js";
import { readLexicon } from "./read.js";

export interface Mismatch {
  readonly line: number;
  readonly word: string;
  readonly machine: string;
  readonly interpreter: string;
}

export async function checkAgainstInterpreter(
  machine: Engine,
  interpreter: Engine,
  inventory: Inventory,
  lexicon: string,
  limit = Number.POSITIVE_INFINITY,
): Promise<{ compared: number; mismatches: Mismatch[] }> {
  const mismatches: Mismatch[] = [];
  let compared = 0;
  for await (const item of readLexicon(lexicon, { inventory })) {
    if (compared >= limit) break;
    if (item.kind !== "row") continue;
    compared++;
    const a = machine.transcribeWord(item.symbols);
    const b = interpreter.transcribeWord(item.symbols);
    const show = (t: typeof a): string => (t === undefined ? "(rejected)" : [t.narrow, ...[...t.variants].sort()].join(" ") + ` / ${t.broad}`);
    if (show(a) !== show(b)) mismatches.push({ line: item.line, word: item.word, machine: show(a), interpreter: show(b) });
  }
  return { compared, mismatches };
}
