// The bench's measuring helpers: medians, the seeded sample, the README section writer and the
// table walk's checksum (the parts whose mistakes would silently skew the published figures).

import { describe, expect, test } from "vitest";
import fc from "fast-check";
import { median, sampleIndices, seededRandom, textTable } from "../../bench/util.js";
import { replaceSection } from "../../bench/readme.js";
import { randomDfa, walk } from "../../bench/table-walk.js";

describe("median", () => {
  test("odd and even counts", () => {
    expect(median([3, 1, 2])).toBe(2);
    expect(median([4, 1, 3, 2])).toBe(2.5);
    expect(() => median([])).toThrow();
  });
  test("zero has one sign whatever the order (the sort cannot tell -0 from +0)", () => {
    for (const xs of [[0, 5e-324, -0], [-0, 5e-324, 0], [-0, 0], [0, -0], [-0]]) expect(Object.is(median(xs), 0)).toBe(true);
    expect(median([-0, 5e-324, 0])).toBe(median([0, 5e-324, -0]));
  });
  test("lies between the minimum and the maximum and ignores order", () => {
    fc.assert(
      fc.property(fc.array(fc.double({ noNaN: true, min: -1e9, max: 1e9 }), { minLength: 1, maxLength: 30 }), (xs) => {
        const m = median(xs);
        expect(m).toBeGreaterThanOrEqual(Math.min(...xs));
        expect(m).toBeLessThanOrEqual(Math.max(...xs));
        expect(median([...xs].reverse())).toBe(m);
      }),
      { numRuns: 200 },
    );
  });
});

describe("text table", () => {
  test("aligns IPA with combining marks by what a terminal shows (string-width)", () => {
    // ɫ̩ is two code points but one column wide: ˈkʰɛ.ɾɫ̩ takes 7 columns, pʰɪn 4.
    const t = textTable(["word", "narrow"], [["kettle", "ˈkʰɛ.ɾɫ̩"], ["pin", "pʰɪn"]]);
    const lines = t.split("\n");
    expect(lines[2]).toBe("kettle  ˈkʰɛ.ɾɫ̩");
    expect(lines[3]).toBe("pin        pʰɪn");
  });
});

describe("seeded sample", () => {
  test("same seed, same sample; distinct, sorted, in range", () => {
    const a = sampleIndices(135_155, 3000, 7);
    expect(sampleIndices(135_155, 3000, 7)).toEqual(a);
    expect(new Set(a).size).toBe(3000);
    expect(a.every((x, i) => x >= 0 && x < 135_155 && (i === 0 || a[i - 1]! < x))).toBe(true);
    expect(sampleIndices(135_155, 3000, 8)).not.toEqual(a);
  });
  test("a sample larger than the population is the whole population", () => {
    expect(sampleIndices(5, 10, 1)).toEqual([0, 1, 2, 3, 4]);
  });
  test("the generator stays in [0, 1)", () => {
    const r = seededRandom(1);
    for (let k = 0; k < 10_000; k++) {
      const x = r();
      expect(x >= 0 && x < 1).toBe(true);
    }
  });
});

describe("README Performance section", () => {
  test("replaces only its own section", () => {
    const text = "# Strata\n\nintro\n\n## Performance\n\nold figures\n\n## Licence\n\nMIT\n";
    expect(replaceSection(text, "new figures")).toBe("# Strata\n\nintro\n\n## Performance\n\nnew figures\n\n## Licence\n\nMIT\n");
  });
  test("appends the section when absent, and is idempotent", () => {
    const text = "# Strata\n\nintro\n";
    const once = replaceSection(text, "figures");
    expect(once).toBe("# Strata\n\nintro\n\n## Performance\n\nfigures\n");
    expect(replaceSection(once, "figures")).toBe(once);
  });
  test("a last section runs to the end of the file", () => {
    expect(replaceSection("a\n\n## Performance\n\nx\ny\n", "z")).toBe("a\n\n## Performance\n\nz\n");
  });
});

describe("table walk", () => {
  test("follows the table: the checksum is the sum of the states reached", () => {
    const dfa = randomDfa(7, 5, 3);
    const ids = Int32Array.from([1, 2, 3, 4, 0, 1]);
    const at = Int32Array.from([0, 4, 6]);
    let want = 0;
    for (const [from, to] of [[0, 4], [4, 6]] as const) {
      let s = 0;
      for (let i = from; i < to; i++) s = dfa.next[s * 5 + ids[i]!]!;
      want += s;
    }
    expect(walk(dfa, ids, at)).toBe(want);
    expect(dfa.next.every((t) => t >= 0 && t < 7)).toBe(true);
  });
});
