// renderIpa fills a code-unit buffer and makes one flat string (lexicon/render.ts); here it is
// compared with the former implementation, which built the text by string concatenation, on
// random symbol tables (texts of any UTF-16 units, astral characters included) and random id
// sequences (boundaries, joins, stressed and unstressed nuclei, runs longer than one piece).

import { describe, expect, it } from "vitest";
import fc from "fast-check";
import { PRIMARY_MARK, SECONDARY_MARK, renderIpa, type RenderOptions, type SymbolView } from "../../src/lexicon/render.js";

/** The former renderIpa, by concatenation (kept here as the reference). */
function concatenated(ids: ArrayLike<number>, view: SymbolView, opts: RenderOptions = {}): string {
  const dots = opts.syllables ?? true;
  const joins = opts.joins ?? false;
  const { kind, texts, stress } = view;
  let from = 0;
  let to = ids.length;
  while (from < to && kind[ids[from]!] === 1) from++;
  while (to > from && kind[ids[to - 1]!] === 1) to--;
  let text = "";
  let i = from;
  let opener = 0;
  while (i <= to) {
    let j = i;
    while (j < to && kind[ids[j]!]! >= 3) j++;
    let firstNucleus = -1;
    let firstMark = 0;
    for (let k = i; k < j; k++) {
      if (view.nucleus[ids[k]!] === 1) {
        firstNucleus = k;
        firstMark = stress[ids[k]!]!;
        break;
      }
    }
    if (opener === 1) text += " ";
    if (firstMark === 1) text += PRIMARY_MARK;
    else if (firstMark === 2) text += SECONDARY_MARK;
    else if (opener === 2 && dots) text += ".";
    for (let k = i; k < j; k++) {
      const id = ids[k]!;
      if (kind[id] === 4) {
        if (joins) text += "+";
        continue;
      }
      if (k !== firstNucleus && view.nucleus[id] === 1) {
        const st = stress[id];
        if (st === 1) text += PRIMARY_MARK;
        else if (st === 2) text += SECONDARY_MARK;
      }
      text += texts[id];
    }
    if (j >= to) break;
    opener = kind[ids[j]!] === 1 ? 1 : 2;
    i = j + 1;
    while (opener === 1 && i < to && kind[ids[i]!] === 1) i++;
  }
  return text;
}

/** A view of ε, '#', '.', '+' and `segments` segments with random texts, stress and nuclei. */
const view = fc.array(fc.record({ text: fc.string({ unit: "binary", minLength: 1, maxLength: 4 }), nucleus: fc.boolean(), stress: fc.constantFrom(0, 1, 2) }), { minLength: 1, maxLength: 12 }).map((segs): SymbolView => {
  const n = segs.length + 4;
  const kind = new Uint8Array(n);
  const stress = new Uint8Array(n);
  const nucleus = new Uint8Array(n);
  kind[1] = 1;
  kind[2] = 2;
  kind[3] = 4;
  const texts = ["", "#", ".", "+"];
  segs.forEach((s, i) => {
    kind[i + 4] = 3;
    texts.push(s.text);
    if (s.nucleus) {
      nucleus[i + 4] = 1;
      stress[i + 4] = s.stress;
    }
  });
  return { texts, kind, stress, nucleus };
});

describe("renderIpa", () => {
  it("writes what the concatenating renderer wrote (property)", () => {
    fc.assert(
      fc.property(view, fc.array(fc.nat(), { maxLength: 40 }), fc.boolean(), fc.boolean(), (v, raw, syllables, joins) => {
        const ids = raw.map((x) => 1 + (x % (v.texts.length - 1)));
        const opts = { syllables, joins };
        expect(renderIpa(ids, v, opts)).toBe(concatenated(ids, v, opts));
        expect(renderIpa([1, ...ids, 1], v, opts)).toBe(concatenated([1, ...ids, 1], v, opts));
      }),
      { numRuns: 2000 },
    );
  });

  it("writes a text longer than one piece of the buffer whole", () => {
    fc.assert(
      fc.property(view, fc.array(fc.nat(), { minLength: 3000, maxLength: 6000 }), (v, raw) => {
        const ids = raw.map((x) => 1 + (x % (v.texts.length - 1)));
        expect(renderIpa(ids, v)).toBe(concatenated(ids, v));
      }),
      { numRuns: 20 },
    );
  });
});
