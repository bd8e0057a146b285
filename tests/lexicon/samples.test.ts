// The sample lines of `strata build` with several varieties: entries whose narrow forms differ,
// every kind of difference represented, deterministic.

import { describe, expect, test } from "vitest";
import { differingSamples, narrowTable, type VarietyTable } from "../../src/lexicon/samples.js";

const table = (variety: string, rows: [string, string][]): VarietyTable => ({
  variety,
  entries: new Map(rows.map(([key, narrow]) => [key, { word: key.split("#")[0]!, narrow }])),
});

describe("differingSamples", () => {
  // a: all three differ; b, c, d: only the third differs; e, f: only the second; g: none
  const a = table("a", [["w1#1", "x"], ["w2#1", "p"], ["w3#1", "q"], ["w4#1", "r"], ["w5#1", "s"], ["w6#1", "t"], ["w7#1", "u"]]);
  const b = table("b", [["w1#1", "y"], ["w2#1", "p"], ["w3#1", "q"], ["w4#1", "r"], ["w5#1", "S"], ["w6#1", "T"], ["w7#1", "u"]]);
  const c = table("c", [["w1#1", "z"], ["w2#1", "P"], ["w3#1", "Q"], ["w4#1", "R"], ["w5#1", "s"], ["w6#1", "t"], ["w7#1", "u"]]);

  test("counts the differing entries and takes every pattern of difference in turn", () => {
    const d = differingSamples([a, b, c], 3);
    expect([d.differing, d.compared]).toEqual([6, 7]);
    // the entry where all differ first, then the larger group (third differs), then the other
    expect(d.samples.map((s) => s.key)).toEqual(["w1#1", "w2#1", "w5#1"]);
    expect(d.samples[0]!.narrow).toEqual(["x", "y", "z"]);
  });

  test("spreads a group's share over the group, and never repeats an entry", () => {
    const d = differingSamples([a, b, c], 6);
    expect(d.samples.map((s) => s.key)).toEqual(["w1#1", "w2#1", "w3#1", "w4#1", "w5#1", "w6#1"]);
    expect(differingSamples([a, b, c], 20).samples.length).toBe(6);
  });

  test("one variety, or none differing: no samples", () => {
    expect(differingSamples([a], 5).samples).toEqual([]);
    expect(differingSamples([a, a], 5)).toEqual({ differing: 0, compared: 7, samples: [] });
  });

  test("an entry missing from one variety (rejected there) is not compared", () => {
    const short = table("b", [["w1#1", "y"]]);
    expect(differingSamples([a, short], 5)).toMatchObject({ differing: 1, compared: 1 });
  });
});

describe("narrowTable", () => {
  test("reads the columns by the header's names", () => {
    const t = narrowTable("v", "key\tword\tnarrow\tbroad\nct1\tten\tˈtʰɛ̃n\tˈtɛn\n");
    expect([...t.entries]).toEqual([["ct1", { word: "ten", narrow: "ˈtʰɛ̃n" }]]);
  });
});
