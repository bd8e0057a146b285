// Joins in pronunciations: '+' (morpheme join) and '#' inside a one-word entry (compound). The
// reader's positioned rejects for misplaced joins, the fast path's agreement, what the outputs keep
// (broad) and drop (narrow, variants, derivation forms), and lint's hint for unmarked joins.

import { Readable } from "node:stream";
import { fileURLToPath } from "node:url";
import { describe, expect, it } from "vitest";
import { loadGrammar } from "../../src/grammar/index.js";
import { tokenise } from "../../src/inventory/index.js";
import { applyStress, readLexicon } from "../../src/lexicon/read.js";
import type { LexiconItem, LexiconRow, RejectedRow } from "../../src/lexicon/read.js";
import { PronReader } from "../../src/lexicon/pron.js";
import { toKey } from "../../src/interp/types.js";
import { InterpreterEngine } from "../../src/lexicon/engine-interp.js";
import { transcribeRow } from "../../src/lexicon/runner.js";
import { lintContext, lintRow } from "../../src/lexicon/lint.js";
import { compoundNarrow } from "../../src/lexicon/compound.js";

const EN_US = fileURLToPath(new URL("../../lexicons/en-us/", import.meta.url));
const g = loadGrammar(EN_US);
if (g.grammar === undefined || g.inventory === undefined) throw new Error(g.diagnostics.map((d) => d.message).join("\n"));
const grammar = g.grammar;
const inv = g.inventory;

async function read(text: string): Promise<LexiconItem[]> {
  const reader = readLexicon(Readable.from([Buffer.from(text, "utf8")]), { inventory: inv, file: "joins.csv" });
  const items: LexiconItem[] = [];
  for await (const x of reader) items.push(x);
  return items;
}
const rowsOf = (items: LexiconItem[]): LexiconRow[] => items.filter((x): x is LexiconRow => x.kind === "row");
const rejectsOf = (items: LexiconItem[]): RejectedRow[] => items.filter((x): x is RejectedRow => x.kind === "reject");

describe("the reader and joins", () => {
  it("keeps '+' and '#' as symbols between segments", async () => {
    const [row] = rowsOf(await read("word,pron\nmisplace,mɪs+ˈpleɪs\nnetwork,ˈnɛt#ˌwɝk\n"));
    expect(row!.symbols.map(toKey).filter((k) => k === "j+" || k === "#")).toEqual(["j+"]);
    const [, net] = rowsOf(await read("word,pron\nmisplace,mɪs+ˈpleɪs\nnetwork,ˈnɛt#ˌwɝk\n"));
    expect(net!.symbols.map(toKey).filter((k) => k === "#")).toEqual(["#"]);
  });

  // Each misplaced join is one reject with its own code, at the line and column of the character at fault.
  it.each([
    ["+ˈpleɪs", "lexicon/join-at-edge", 10],
    ["mɪs+", "lexicon/join-at-edge", 13],
    ["ˈnɛt+#wɝk", "lexicon/join-at-edge", 14],
    ["ˈnɛt#+wɝk", "lexicon/join-at-edge", 15],
    ["mɪs++ˈpleɪs", "lexicon/doubled-join", 14],
    ["mɪs.+ˈpleɪs", "lexicon/join-next-to-break", 13],
    ["mɪs+.ˈpleɪs", "lexicon/join-next-to-break", 14],
    ["mɪsˈ+pleɪs", "lexicon/stress-before-join", 13],
  ])("rejects %s with %s at 2:%i", async (pron, code, column) => {
    const items = await read(`word,pron\nmisplace,${pron}\n`);
    const [r] = rejectsOf(items);
    expect(rowsOf(items)).toEqual([]);
    expect(r).toMatchObject({ code, line: 2, column });
  });

  it("the fast path reads joins as the general path does, and leaves misplaced ones to it", () => {
    const fast = new PronReader(inv);
    for (const p of ["mɪs+ˈpleɪs", "ˈweɪt+ɪŋ", "ˈnɛt#ˌwɝk", "ʌn+ˌdu+ɪŋ", "mɪs + ˈpleɪs"]) {
      const f = fast.read(p);
      const t = tokenise(inv, p);
      const s = t.ok ? applyStress(inv, t.tokens) : undefined;
      expect(f, p).toBeDefined();
      expect(s?.ok && s.symbols.map(toKey)).toEqual(f!.symbols.map(toKey));
    }
    for (const p of ["+a", "a+", "a++b", "a+.b", "ˈa+#b", "aˈ+b"]) expect(fast.read(p), p).toBeUndefined();
  });
});

describe("outputs of entries with joins (interpreter engine, en-us)", () => {
  const engine = new InterpreterEngine(grammar, inv);
  const run = async (text: string) => {
    const rows = rowsOf(await read(`word,pron\n${text}\n`));
    return rows.map((r, i) => transcribeRow(engine, r, `k${i}`));
  };

  it("the broad form keeps '+', narrow forms and derivation forms drop it", async () => {
    const [e] = await run("misplace,mɪs+ˈpleɪs");
    expect(e).toMatchObject({ kind: "entry", broad: "mɪs+ˈpleɪs" });
    if (e!.kind !== "entry") return;
    for (const v of [e.narrow, ...e.variants, ...e.derivation.map((d) => d.form)]) expect(v).not.toMatch(/[+#]/);
  });

  it("a compound (one-word spelling, '#' in the pron) keeps '#' in the broad form and no space in narrow forms", async () => {
    const [net, phrase] = await run("network,ˈnɛt#ˌwɝk\nnext stop,ˈnɛkst#ˈstɑp");
    expect(net).toMatchObject({ kind: "entry", broad: "ˈnɛt#ˌwɝk" });
    // The second part opens with its stress mark, no space (the t itself is the grammar's business: t or ʔ).
    if (net!.kind === "entry") expect(net.narrow).toMatch(/^ˈnɛ[tʔ]ˌwɝk$/);
    // A phrase keeps the space between its words in every form.
    expect(phrase).toMatchObject({ kind: "entry", broad: "ˈnɛkst ˈstɑp" });
    if (phrase!.kind === "entry") expect(phrase.narrow).toContain(" ");
  });

  it("writes a compound's join as '.' before an unstressed part, or nothing (no syllable dots)", () => {
    expect(compoundNarrow("ˈwʌt ɛvɚ", true)).toBe("ˈwʌt.ɛvɚ");
    expect(compoundNarrow("ˈwʌt ɛvɚ", false)).toBe("ˈwʌtɛvɚ");
    expect(compoundNarrow("ˈnɛt ˌwɝk", true)).toBe("ˈnɛtˌwɝk");
  });
});

describe("lint and joins", () => {
  const ctx = lintContext(grammar, inv);
  it("hints at a likely unmarked join where a word-internal cluster has no legal split, with its position", async () => {
    // CMU "VANVLEET" (cmudict 0.7b via cmu-pronouncing-dictionary): v ˈæ n v l ˌi t. The cluster nvl
    // has no legal split under en-us (vl is no onset, nv no coda); a join after n ends the first
    // part legally — where the name's parts meet (Van + Vleet).
    const [row] = rowsOf(await read("word,pron\nvanvleet,vˈænvlˌit\n"));
    const hints = lintRow(row!, ctx).filter((f) => f.code === "lint/unmarked-join");
    expect(hints).toHaveLength(1);
    expect(hints[0]).toMatchObject({ severity: "hint", line: 2, column: 13, cluster: "nvl" });
    expect(hints[0]!.message).toContain("n#vl");
    // With the join marked, the hint goes away.
    const [marked] = rowsOf(await read("word,pron\nvanvleet,vˈæn#vlˌit\n"));
    expect(lintRow(marked!, ctx).filter((f) => f.code === "lint/unmarked-join")).toEqual([]);
    // A cluster with a legal split gets no hint ("mistake", mɪ.steɪk).
    const [plain] = rowsOf(await read("word,pron\nmistake,mɪˈsteɪk\n"));
    expect(lintRow(plain!, ctx).filter((f) => f.code === "lint/unmarked-join")).toEqual([]);
  });

  it("counts primary stress over a whole compound (one stress domain), per word in a phrase", async () => {
    const [compound, phrase] = rowsOf(await read("word,pron\nnetwork,ˈnɛt#ˈwɝk\nnet work,ˈnɛt#ˈwɝk\n"));
    expect(lintRow(compound!, ctx).map((f) => f.code)).toContain("lint/many-primary");
    expect(lintRow(phrase!, ctx).map((f) => f.code)).not.toContain("lint/many-primary");
  });
});
