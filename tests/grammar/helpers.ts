// Shared helpers for the grammar tests: a small invented inventory, a parse-split-check pipeline,
// temporary grammar folders on disk, and a compact printer for patterns.

import { mkdtempSync, mkdirSync, writeFileSync } from "node:fs";
import { tmpdir } from "node:os";
import { dirname, join } from "node:path";
import type { Diagnostic } from "../../src/diagnostics.js";
import { parseInventory, type Inventory } from "../../src/inventory/index.js";
import { checkGrammar, parseGrammarText, splitLiterals, type Element, type Grammar, type Pattern, type Rule } from "../../src/grammar/index.js";

/** An invented toy inventory (values chosen for the tests, not a description of any language). */
export const TOY_SEGMENTS = `symbol,syllabic,consonantal,sonorant,continuant,nasal,voice,labial,coronal,dorsal
p,-,+,-,-,-,-,+,-,-
t,-,+,-,-,-,-,-,+,-
k,-,+,-,-,-,-,-,-,+
b,-,+,-,-,-,+,+,-,-
d,-,+,-,-,-,+,-,+,-
s,-,+,-,+,-,-,-,+,-
m,-,+,+,-,+,+,+,-,-
n,-,+,+,-,+,+,-,+,-
ŋ,-,+,+,-,+,+,-,-,+
l,-,+,+,+,-,+,-,+,-
a,+,-,+,+,-,+,-,-,+
i,+,-,+,+,-,+,-,+,-
ə,+,-,+,+,-,+,-,-,-
`;
/** ʰ adds a feature of its own (aspiration); a tilde nasalises; ː lengthens. No voiceless mark. */
export const TOY_DIACRITICS = `mark,name,sets,aliases
U+02B0,aspirated,+spread_glottis,
U+0303,nasalised,+nasal,
U+02D0,long,+long,
`;

let toy: Inventory | undefined;
export function toyInventory(): Inventory {
  if (toy !== undefined) return toy;
  const r = parseInventory(TOY_SEGMENTS, "segments.csv", TOY_DIACRITICS, "diacritics.csv");
  if (r.inventory === undefined) throw new Error(r.diagnostics.map((d) => d.message).join("\n"));
  toy = r.inventory;
  return toy;
}

/** Parse, split literals with the toy inventory and check: every diagnostic of the three stages. */
export function checkText(text: string, file = "/toy/grammar.strata"): { grammar: Grammar; diagnostics: Diagnostic[] } {
  const parsed = parseGrammarText(text, file);
  const split = splitLiterals(parsed.grammar, toyInventory());
  return { grammar: split.grammar, diagnostics: [...parsed.diagnostics, ...split.diagnostics, ...checkGrammar(split.grammar, toyInventory())] };
}

/** Writes files (relative path → text) under a fresh temporary folder and returns the folder. */
export function tempTree(files: Record<string, string>): string {
  const root = mkdtempSync(join(tmpdir(), "strata-grammar-"));
  for (const [rel, text] of Object.entries(files)) {
    const p = join(root, rel);
    mkdirSync(dirname(p), { recursive: true });
    writeFileSync(p, text);
  }
  return root;
}

export const rules = (g: Grammar): Rule[] => g.steps.filter((s): s is Rule => s.kind === "rule");

/** Compact text of an element: segments as written, classes by name, bundles with their specs. */
export function showElement(e: Element): string {
  switch (e.kind) {
    case "segment":
      return e.symbol;
    case "class":
      return e.name;
    case "boundary":
      return e.which === "word" ? "#" : e.which === "join" ? "+" : "$";
    case "bundle":
      return `[${e.specs.map((s) => (s.kind === "value" ? `${s.value}${s.feature}` : `${s.negated ? "-" : ""}${s.variable}${s.feature}`)).join(" ")}]`;
  }
}

/** Compact text of a pattern: `( )` optional, `{a | b}` choice, `X_min^max` repetition. */
export function show(p: Pattern): string {
  switch (p.kind) {
    case "element":
      return showElement(p.element);
    case "sequence":
      return p.items.map(show).join(" ");
    case "optional":
      return `(${show(p.body)})`;
    case "choice":
      return `{${p.options.map(show).join(" | ")}}`;
    case "repeat": {
      const body = p.body.kind === "element" || p.body.kind === "choice" ? show(p.body) : `(${show(p.body)})`;
      return `${body}_${p.min}${p.max === null ? "" : `^${p.max}`}`;
    }
  }
}

/** Position of a diagnostic as "line:column". */
export const at = (d: { line: number; column: number }): string => `${d.line}:${d.column}`;
