// Rule-ordering examples from the literature, written as small grammars of our own
// (tests/analyze/literature/*.strata, each naming its source), and the en-us grammar's own
// interactions: the exact analysis must find the relation each source states, and only it.

import { describe, it, expect, beforeAll } from "vitest";
import { loadGrammar } from "../../src/grammar/index.js";
import { analyseInteractions, RELATIONS, type InteractionReport, type RelationKind } from "../../src/analyze/interactions.js";

const HERE = "tests/analyze/literature";

function analyse(path: string): InteractionReport {
  const g = loadGrammar(path);
  expect(g.diagnostics.filter((d) => d.severity === "error")).toEqual([]);
  const r = analyseInteractions(g.grammar!, g.inventory!);
  expect(r.diagnostics).toEqual([]);
  return r.report!;
}

/** The relations found between steps named a and b (a before b), and any pair not decided. */
function relations(r: InteractionReport, a: string, b: string): RelationKind[] {
  const ia = r.steps.findIndex((s) => s.name === a);
  const ib = r.steps.findIndex((s) => s.name === b);
  const p = r.pairs.find((x) => x.a === ia && x.b === ib);
  if (p === undefined) throw new Error(`no pair ${a} ${b}`);
  for (const k of RELATIONS) expect(p.relations[k].decided, `${a} ${k} ${b} decided`).toBe(true);
  return RELATIONS.filter((k) => { const d = p.relations[k]; return d.decided && d.value !== null; });
}

describe("orders from the literature", () => {
  it("Canadian raising before flapping is counterbleeding (Joos 1942; Chomsky 1964; Kenstowicz 1994; Hayes 2009 — from memory)", () => {
    const r = analyse(`${HERE}/canadian-raising.strata`);
    expect(relations(r, "raising", "flapping")).toEqual(["counterbleeds"]);
    // The order matters: swapping the two rules changes some output ("writer").
    expect(r.swaps[0]!.difference).toMatchObject({ decided: true });
    expect((r.swaps[0]!.difference as { value: unknown }).value).not.toBeNull();
  });

  it("flapping before raising is bleeding (Joos 1942; Kenstowicz 1994; Hayes 2009 — from memory)", () => {
    const r = analyse(`${HERE}/flapping-first.strata`);
    expect(relations(r, "flapping", "raising")).toEqual(["bleeds"]);
  });

  it("English plural: epenthesis bleeds devoicing (Kenstowicz 1994; Hayes 2009 — from memory)", () => {
    const r = analyse(`${HERE}/english-plural.strata`);
    expect(relations(r, "epenthesis", "devoicing")).toEqual(["bleeds"]);
  });

  it("Finnish diphthongisation before ɣ-loss is counterfeeding (Kiparsky 1968 — from memory)", () => {
    const r = analyse(`${HERE}/finnish.strata`);
    expect(relations(r, "diphthongisation", "g-loss")).toEqual(["counterfeeds"]);
  });

  it("nasalisation before nasal deletion is counterbleeding (Kenstowicz 1994; Hayes 2009 — from memory)", () => {
    const r = analyse(`${HERE}/nasal-deletion.strata`);
    expect(relations(r, "nasalisation", "nasal-deletion")).toEqual(["counterbleeds"]);
  });

  it("the feeding schema: final raising feeds assibilation before i (Kiparsky 1968's definition — from memory; invented forms)", () => {
    const r = analyse(`${HERE}/feeding.strata`);
    expect(relations(r, "raising", "assibilation")).toEqual(["feeds"]);
    const p = r.pairs[0]!.relations.feeds;
    // The shortest witness is "#ke#": k before final e, raised to i, then assibilated.
    expect(p.decided && p.value !== null && p.value.input.length).toBe(4);
  });
});

describe("the en-us grammar's own interactions (lexicons/en-us/README.md and the grammar comments)", () => {
  let r: InteractionReport;
  beforeAll(() => { r = analyse("lexicons/en-us/grammar.strata"); }, 300_000);

  it("dark l feeds syllabic l (common.strata)", () => {
    expect(relations(r, "dark-l", "syllabic-l")).toContain("feeds");
  });
  it("syllabic n feeds schwa deletion, which bleeds flapping and feeds the glottal stop (common.strata, reductions.strata)", () => {
    expect(relations(r, "syllabic-n", "schwa-deletion")).toContain("feeds");
    expect(relations(r, "schwa-deletion", "flapping")).toContain("bleeds");
    expect(relations(r, "schwa-deletion", "glottal-stop")).toContain("feeds");
  });
  it("flapping before nasalisation is counterbleeding: nasalisation first would bleed it (coarticulation.strata)", () => {
    expect(relations(r, "flapping", "nasalisation")).toEqual(["counterbleeds"]);
  });
  it("aspiration feeds approximant devoicing, and the two do not commute (coarticulation.strata)", () => {
    expect(relations(r, "aspiration", "approximant-devoicing")).toEqual(["feeds"]);
    const s = r.swaps.find((x) => r.steps[x.a]!.name === "aspiration")!;
    expect(s.difference.decided && s.difference.value !== null).toBe(true);
  });
  it("dental place bleeds syllabic n, counterbleeds dark l (\"wealth\" ɫ̪), does not interact with flapping, and bleeds the glottal stop before θ ð of the next syllable (common.strata)", () => {
    expect(relations(r, "dental-place", "syllabic-n")).toContain("bleeds");
    expect(relations(r, "dental-place", "dark-l")).toEqual(["counterbleeds"]);
    expect(relations(r, "dental-place", "flapping")).toEqual([]);
    // t̪ is not t: a dental t before θ ð stays (and glottal-stop first would take the t from dental place)
    expect(relations(r, "dental-place", "glottal-stop")).toEqual(["bleeds", "counterbleeds"]);
  });
  it("pre-voiced lengthening before flapping is counterbleeding: \"rider\" keeps its length (Joos 1942; Chomsky 1964 — from memory; common.strata)", () => {
    expect(relations(r, "pre-voiced-lengthening", "flapping")).toEqual(["counterbleeds"]);
  });
  it("syllabic n does not bleed flapping itself: schwa deletion does; flapping first would bleed syllabic n (common.strata, reductions.strata)", () => {
    expect(relations(r, "syllabic-n", "flapping")).toEqual(["counterbleeds"]);
  });
  it("nasal flap: no interaction with aspiration; nasalisation no longer bleeds it (nasal-flap.strata)", () => {
    expect(relations(r, "aspiration", "nasal-flap")).toEqual([]);
    expect(relations(r, "nasalisation", "nasal-flap")).not.toContain("bleeds");
    expect(relations(r, "nasal-flap", "nasal-flap-merger")).toEqual(["feeds"]);
  });
  it("flapping and the glottal stop do not interact with aspiration: the order among them is free (coarticulation.strata)", () => {
    expect(relations(r, "flapping", "aspiration")).toEqual([]);
    expect(relations(r, "glottal-stop", "aspiration")).toEqual([]);
    const s = r.swaps.find((x) => r.steps[x.a]!.name === "glottal-stop")!;
    expect(s.difference).toEqual({ decided: true, value: null });
  });
  it("no step of the shipped grammar is dead", () => {
    for (const s of r.steps) expect(s.applies.decided && s.applies.value !== null, s.name).toBe(true);
  });
});
