// `strata compare` on real scenarios — a rule removed, two rules reordered, a rule's context
// changed, lexicon rows edited, added and deleted — on the demo and on a CMU slice. Counts and
// blame are checked against an independent computation: the reference interpreter's results
// (narrow form, variants, steps that changed the entry) for every entry under both grammars.

import { appendFileSync, readFileSync, writeFileSync } from "node:fs";
import { basename, join } from "node:path";
import { beforeAll, describe, expect, it } from "vitest";
import { compareBuilds, type Comparison, type VarietyComparison } from "../../src/regress/compare.js";
import { build, cmuFolder, copyLexicons, edit, interpreted } from "./support.js";

interface Scenario {
  readonly root: string;
  readonly lexicon: string;
  readonly comparison: Comparison;
  /** Interpreter results under the old and the new sources, per variety (grammar file name) and key. */
  readonly old: Map<string, Awaited<ReturnType<typeof interpreted>>>;
  readonly new: Map<string, Awaited<ReturnType<typeof interpreted>>>;
}

const GRAMMARS: Record<string, string> = { general: "grammar.strata", careful: "careful.strata" };

/** Builds the lexicon folder, applies `change`, builds again, compares; interprets both states. */
async function scenario(change: (root: string) => void, opts: { lexicon?: (root: string) => string; varieties?: string[] } = {}): Promise<Scenario> {
  const root = copyLexicons();
  const lexicon = opts.lexicon?.(root) ?? join(root, "lexicons", "demo");
  const names = opts.varieties ?? ["general", "careful"];
  const interpretAll = async () => new Map(await Promise.all(names.map(async (v) => [v, await interpreted(join(root, "lexicons", "en-us", GRAMMARS[v]!), join(lexicon, "lexicon.csv"))] as const)));
  expect(await build(lexicon, join(root, "old"))).toBe(0);
  const old = await interpretAll();
  change(root);
  const code = await build(lexicon, join(root, "new"));
  expect([0, 4]).toContain(code); // 4: a pinned expectation of the demo no longer holds
  const res = await compareBuilds(join(root, "old", basename(lexicon)), join(root, "new", basename(lexicon)));
  if (res.comparison === undefined) throw new Error(JSON.stringify(res.diagnostics));
  return { root, lexicon, comparison: res.comparison, old, new: await interpretAll() };
}

/** Keys whose interpreter output (narrow form or variant set) differs between the two states. */
function differing(s: Scenario, variety: string): Set<string> {
  const a = s.old.get(variety)!;
  const b = s.new.get(variety)!;
  const out = new Set<string>();
  for (const [k, x] of b) {
    const y = a.get(k);
    if (y !== undefined && (x.narrow !== y.narrow || x.variants.join(" ") !== y.variants.join(" "))) out.add(k);
  }
  return out;
}

const v = (s: Scenario, name: string): VarietyComparison => s.comparison.varieties.find((x) => x.name === name)!;

describe("a rule removed (flapping, from the file both varieties' general grammar includes)", () => {
  let s: Scenario;
  beforeAll(async () => {
    s = await scenario((root) => edit(join(root, "lexicons", "en-us", "reductions.strata"), /rule flapping:\n.*\n/, ""));
  }, 180_000);

  it("changes exactly the entries the interpreter says changed, each blamed on the removed step", () => {
    const g = v(s, "general");
    const expected = differing(s, "general");
    expect(expected.size).toBeGreaterThan(20);
    expect(new Set(g.changes.map((c) => c.key))).toEqual(expected);
    expect(g.counts).toMatchObject({ changed: expected.size, added: 0, removed: 0, unchanged: 391 - expected.size });
    // Independent blame: flapping changed these entries under the old grammar.
    for (const c of g.changes) expect(s.old.get("general")!.get(c.key)!.rules).toContain("flapping");
    expect(g.blame).toEqual([{ rule: "flapping", count: expected.size, how: { "step removed": expected.size }, examples: expect.any(Array) }]);
    expect(g.sources.stepsRemoved).toEqual(["flapping"]);
    expect(g.sources.grammarFiles).toEqual([{ path: "../en-us/reductions.strata", status: "changed" }]);
  });

  it("leaves the careful variety (which does not include the file) unchanged", () => {
    expect(v(s, "careful").counts.changed).toBe(0);
    expect(differing(s, "careful").size).toBe(0);
  });

  it("counts the changes as unexpected unless the rule is named, and reports the failed pins", async () => {
    // the regional (Canadian) variety's grammar has the base's flapping too
    expect(s.comparison.unexpected).toBe(v(s, "general").counts.changed + v(s, "regional").counts.changed);
    expect(v(s, "general").failedExpectations).toBe(4);
    const again = await compareBuilds(join(s.root, "old", "demo"), join(s.root, "new", "demo"), { expect: ["flapping"] });
    expect(again.comparison!.unexpected).toBe(0);
  });
});

describe("two rules reordered (approximant devoicing before the aspiration that feeds it)", () => {
  let s: Scenario;
  beforeAll(async () => {
    s = await scenario((root) => {
      const file = join(root, "lexicons", "en-us", "coarticulation.strata");
      const text = readFileSync(file, "utf8");
      const asp = /rule aspiration:[\s\S]*?(?=\n\S)/.exec(text)![0];
      const dev = /rule approximant-devoicing:[\s\S]*?(?=\n\S)/.exec(text)![0];
      writeFileSync(file, text.replace(asp, "@@A@@").replace(dev, asp).replace("@@A@@", dev));
    });
  }, 180_000);

  it("matches the interpreter: every change is one that approximant devoicing no longer makes", () => {
    for (const name of ["general", "careful"]) {
      const x = v(s, name);
      const expected = differing(s, name);
      expect(expected.size).toBeGreaterThan(10);
      expect(new Set(x.changes.map((c) => c.key))).toEqual(expected);
      for (const c of x.changes) {
        const lost = s.old.get(name)!.get(c.key)!.rules.includes("approximant-devoicing") && !s.new.get(name)!.get(c.key)!.rules.includes("approximant-devoicing");
        expect(lost, c.key).toBe(true);
        expect(c.blame).toMatchObject({ rule: "approximant-devoicing", how: "no longer applies" });
      }
      expect(x.sources.stepsAdded).toEqual([]);
    }
  });
});

describe("a rule's context changed (flapping no longer after r)", () => {
  let s: Scenario;
  beforeAll(async () => {
    s = await scenario((root) => edit(join(root, "lexicons", "en-us", "reductions.strata"), "AlveolarStop -> ɾ / Vowel (ɹ) _", "AlveolarStop -> ɾ / Vowel _"));
  }, 180_000);

  it("blames flapping on exactly the entries the interpreter says it stopped changing", () => {
    const g = v(s, "general");
    const expected = differing(s, "general");
    expect(expected.size).toBeGreaterThanOrEqual(3);
    expect(new Set(g.changes.map((c) => c.key))).toEqual(expected);
    for (const c of g.changes) {
      expect(s.old.get("general")!.get(c.key)!.rules).toContain("flapping");
      expect(s.new.get("general")!.get(c.key)!.rules).not.toContain("flapping");
      expect(c).toMatchObject({ cause: "grammar", blame: { rule: "flapping", how: "no longer applies", text: "flapping no longer applies" } });
    }
    expect(g.changes.map((c) => c.word)).toContain("forty");
    expect(g.sources.stepsRemoved).toEqual([]);
  });
});

describe("lexicon rows edited, added and deleted", () => {
  let s: Scenario;
  beforeAll(async () => {
    s = await scenario((root) => {
      const csv = join(root, "lexicons", "demo", "lexicon.csv");
      edit(csv, "ten,ˈtɛn,ct0011,num,number,", "ten,ˈtɪn,ct0011,num,number,");
      edit(csv, "four,ˈfɔɹ,ct0005,num,number,\n", "");
      edit(csv, "forty,ˈfɔɹti,ct0023,num,number,", "forty,ˈfɔɹti,ct0023,num,number;tens,");
      appendFileSync(csv, "Quennel Bay,ˈkwɛnəl#ˈbeɪ,ct9001,name,station,\n");
    });
  }, 180_000);

  it("reports one added, one removed and one input change per variety, nothing else", () => {
    for (const name of ["general", "careful"]) {
      const x = v(s, name);
      expect(x.added.map((e) => e.key)).toEqual(["ct9001"]);
      expect(x.removed.map((e) => e.key)).toEqual(["ct0005"]);
      // The tag edit on forty changes no output: it is unchanged.
      expect(x.changes.map((c) => [c.key, c.cause])).toEqual([["ct0011", "input"]]);
      expect(x.counts).toMatchObject({ old: 391, new: 391, changed: 1, added: 1, removed: 1, unchanged: 389 });
      expect(x.added[0]!.narrow).toBe(s.new.get(name)!.get("ct9001")!.narrow);
      expect(x.classes.map((c) => c.class).sort()).toEqual(["added", "input", "removed"]);
      expect(x.sources).toMatchObject({ lexiconChanged: true, grammarFiles: [], inventoryChanged: false });
    }
  });

  it("'input' declares them expected", async () => {
    const again = await compareBuilds(join(s.root, "old", "demo"), join(s.root, "new", "demo"), { expect: ["input"] });
    expect(again.comparison!.unexpected).toBe(0);
  });
});

describe("a CMU slice (keys word#n, no id column): aspiration's context changed", () => {
  let s: Scenario;
  beforeAll(async () => {
    s = await scenario(
      (root) => edit(join(root, "lexicons", "en-us", "coarticulation.strata"), "/ # _ [+sonorant]", "/ # _ [+syllabic]"),
      { lexicon: (root) => cmuFolder(root, 600, 211), varieties: ["general"] },
    );
  }, 240_000);

  it("matches the interpreter's diff, with blame on aspiration", () => {
    const g = s.comparison.varieties[0]!;
    const expected = differing(s, "general");
    expect(expected.size).toBeGreaterThanOrEqual(5);
    expect(new Set(g.changes.map((c) => c.key))).toEqual(expected);
    expect(g.changes.every((c) => /#\d+$/.test(c.key))).toBe(true);
    for (const c of g.changes) {
      const before = s.old.get("general")!.get(c.key)!.rules.includes("aspiration");
      const after = s.new.get("general")!.get(c.key)!.rules.includes("aspiration");
      if (before && !after) expect(c.blame).toMatchObject({ rule: "aspiration", how: "no longer applies" });
      else expect(c.blame?.rule, c.key).toBe("aspiration");
    }
    expect(g.counts.old).toBe(600);
  });
});
