// Reader symbols → a compiled alphabet's ids without building a bundle key per symbol: the id of a
// segment is remembered per bundle object (the reader shares one bundle per distinct segment and
// stress), so the key is built once per distinct bundle, not once per symbol of every entry.

import type { Compiled } from "../compile/index.js";
import { JOIN, SYLL, WORD } from "../compile/index.js";
import { bundleKey, type Bundle } from "../inventory/types.js";
import type { Word } from "../interp/index.js";

export class SymbolEncoder {
  /** Keyed by bundle identity; -1 for a bundle outside the alphabet. Weak: callers' fresh bundles are not kept. */
  private readonly ids = new WeakMap<Bundle, number>();

  constructor(private readonly compiled: Compiled) {}

  /** Id of one segment bundle, -1 when outside the alphabet. */
  idOf(bundle: Bundle): number {
    let id = this.ids.get(bundle);
    if (id === undefined) {
      id = this.compiled.alphabet.byKey.get(bundleKey(bundle)) ?? -1;
      this.ids.set(bundle, id);
    }
    return id;
  }

  /** Ids of `#` + word + `#`; null when a segment is outside the alphabet (as `Compiled.encode`). */
  encode(word: Word): number[] | null {
    const out: number[] = new Array<number>(word.length + 2);
    out[0] = WORD;
    for (let i = 0; i < word.length; i++) {
      const s = word[i]!;
      let id: number;
      if (s.kind === "boundary") id = s.which === "word" ? WORD : s.which === "join" ? JOIN : SYLL;
      else {
        id = this.idOf(s.bundle);
        if (id < 0) return null;
      }
      out[i + 1] = id;
    }
    out[word.length + 1] = WORD;
    return out;
  }
}
