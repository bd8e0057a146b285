// The explain and interactions commands in-process: outputs, positioned messages for bad input,
// exit codes, and a pair too large to analyse reported as not decided while the rest prints.

import { describe, it, expect } from "vitest";
import { runExplainCommand, runInteractionsCommand } from "../../src/analyze/commands.js";
import { loadGrammar } from "../../src/grammar/index.js";
import { analyseInteractions, RELATIONS } from "../../src/analyze/interactions.js";

const LIT = "tests/analyze/literature";

describe("strata explain", () => {
  it("explains broad IPA typed on the command line and spellings found in --from", async () => {
    const r = await runExplainCommand({ grammar: "lexicons/en-us/careful.strata", words: [{ text: "ˈwɔtɚ", column: 30 }, { text: "zero", column: 40 }], from: "lexicons/demo/lexicon.csv" });
    expect(r.exitCode).toBe(0);
    expect(r.stdout).toMatch(/^ˈwɔtɚ$/m);
    expect(r.stdout).toMatch(/^zero \/ˈzɪɹoʊ\/  \(lexicons\/demo\/lexicon\.csv:2\)$/m);
    expect(r.stdout).toMatch(/^surface\s+\[ˈwɔ\.tɚ\]$/m);
  }, 120_000);

  it("reports an unknown symbol at its column on the command line, exit 1", async () => {
    const r = await runExplainCommand({ grammar: `${LIT}/canadian-raising.strata`, words: [{ text: "ɹaɪtQ", column: 25 }] });
    expect(r.exitCode).toBe(1);
    expect(r.stdout).toBe("");
    expect(r.diagnostics[0]).toMatchObject({ file: "command line", line: 1, column: 29, severity: "error" });
  }, 60_000);

  it("needs words or --from", async () => {
    const r = await runExplainCommand({ grammar: `${LIT}/canadian-raising.strata`, words: [] });
    expect(r.exitCode).toBe(1);
    expect(r.diagnostics[0]!.code).toBe("explain/nothing");
  });

  it("writes JSON with --json", async () => {
    const r = await runExplainCommand({ grammar: `${LIT}/canadian-raising.strata`, words: [{ text: "ɹaɪtəɹ", column: 1 }], json: true });
    const j = JSON.parse(r.stdout) as { surface: string }[] & { derivations: { surface: string }[] }[];
    expect(j[0]!.derivations[0]!.surface).toBe("ɹʌɪɾəɹ");
  });
});

describe("strata interactions", () => {
  it("table, JSON and DOT for a small grammar", async () => {
    const t = await runInteractionsCommand({ grammar: `${LIT}/canadian-raising.strata`, grammarName: "canadian-raising.strata" });
    expect(t.exitCode).toBe(0);
    expect(t.stdout).toMatch(/raising\s+counterbleeds\s+flapping/);
    expect(t.stdout).not.toMatch(/\/work\//);
    const j = await runInteractionsCommand({ grammar: `${LIT}/canadian-raising.strata`, grammarName: "canadian-raising.strata", format: "json" });
    const data = JSON.parse(j.stdout) as { relations: { a: string; b: string; relation: string; order: string }[] };
    expect(data.relations.map((x) => [x.a, x.relation, x.b, x.order])).toEqual([["raising", "counterbleeds", "flapping", "counterbleeding"]]);
    const d = await runInteractionsCommand({ grammar: `${LIT}/canadian-raising.strata`, grammarName: "canadian-raising.strata", format: "dot" });
    expect(d.stdout).toMatch(/^digraph interactions \{/);
    expect(d.stdout).toMatch(/s0 -> s1 \[label="counterbleeds"/);
  }, 60_000);

  it("with --lexicon, names entries that show a relation", async () => {
    const r = await runInteractionsCommand({ grammar: "lexicons/en-us/grammar.strata", grammarName: "lexicons/en-us", lexicon: "lexicons/demo/lexicon.csv", format: "json" });
    const data = JSON.parse(r.stdout) as { relations: { a: string; b: string; relation: string; entries?: { word: string }[] }[]; steps: { name: string; lexiconEntriesChanged: number }[] };
    const dark = data.relations.find((x) => x.a === "dark-l" && x.b === "syllabic-l" && x.relation === "feeds")!;
    expect(dark.entries!.length).toBeGreaterThan(0);
    expect(data.steps.every((s) => typeof s.lexiconEntriesChanged === "number")).toBe(true);
  }, 300_000);

  it("a bad grammar is exit 1 with the grammar's diagnostics", async () => {
    const r = await runInteractionsCommand({ grammar: `${LIT}/no-such.strata`, grammarName: "x" });
    expect(r.exitCode).toBe(1);
    expect(r.diagnostics.length).toBeGreaterThan(0);
  });

  it("an analysis over the size limit is 'not decided' with the reason; the rest of the report stands", () => {
    const g = loadGrammar(`${LIT}/english-plural.strata`);
    const { report } = analyseInteractions(g.grammar!, g.inventory!, { maxStates: 40 });
    const all = report!.pairs.flatMap((p) => RELATIONS.map((k) => p.relations[k]));
    const undecided = all.filter((d) => !d.decided);
    expect(undecided.length).toBeGreaterThan(0);
    for (const d of undecided) expect((d as { reason: string }).reason).toMatch(/would exceed 40 states/);
    expect(report!.steps.length).toBe(2);
  });
});
