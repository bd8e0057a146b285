// The bench's second baseline: the in-house script (bench/inhouse.ts) made to write what a
// three-format `strata build` writes — the same kinds of records in the same three files, written
// the way such a script would: csv-parse, the regular-expression cascade run one rule at a time so
// each record can say which rules changed it and the form after each, JSON.stringify for the JSON
// Lines, a template for the PLS lexemes, writeFileSync for each file. It does not syllabify, check
// stress, enumerate variants or read its files back, so it is a floor for the formats alone: what
// writing records of this size costs on this machine, before any of the work Strata adds.
// Usage: node dist/bench/inhouse-formats.js LEXICON_CSV OUT_DIR

import { mkdirSync, readFileSync, writeFileSync } from "node:fs";
import { basename, join } from "node:path";
import { parse } from "csv-parse/sync";
import { cascadeSteps, REGEX_RULES } from "./regex-cascade.js";

const [file, outDir] = process.argv.slice(2);
if (file === undefined || outDir === undefined) {
  process.stderr.write("usage: inhouse-formats LEXICON_CSV OUT_DIR\n");
  process.exit(2);
}
const records = parse(readFileSync(file, "utf8"), { bom: true, relax_column_count: true, skip_empty_lines: true }) as string[][];
const header = records[0] ?? [];
const iWord = header.indexOf("word");
const iPron = header.indexOf("pron");
const source = basename(file);
const xml = (s: string): string => s.replace(/&/g, "&amp;").replace(/</g, "&lt;").replace(/>/g, "&gt;");

const tsv: string[] = ["key\tword\tnarrow\tbroad\n"];
const jsonl: string[] = [];
const pls: string[] = [
  '<?xml version="1.0" encoding="UTF-8"?>\n<lexicon xmlns="http://www.w3.org/2005/01/pronunciation-lexicon" version="1.0" alphabet="ipa" xml:lang="en-US">\n',
];
const seen = new Map<string, number>();
for (let k = 1; k < records.length; k++) {
  const r = records[k]!;
  const word = r[iWord] ?? "";
  const pron = r[iPron] ?? "";
  const broad = pron.replace(/\s+/g, "");
  const n = (seen.get(word) ?? 0) + 1;
  seen.set(word, n);
  const key = `${word}#${n}`;
  const derivation: { step: string; form: string }[] = [];
  const rules: string[] = [];
  let form = broad;
  const forms = cascadeSteps(broad);
  for (let i = 0; i < forms.length; i++) {
    if (forms[i] === form) continue;
    form = forms[i]!;
    rules.push(REGEX_RULES[i]!);
    derivation.push({ step: REGEX_RULES[i]!, form });
  }
  tsv.push(`${key}\t${word}\t${form}\t${broad}\n`);
  const record = {
    key, word, narrow: form, broad, variants: [form], rules,
    source: { file: source, line: k + 1 }, derivation, variantSteps: [rules], input: { pron, tags: [] as string[] },
  };
  jsonl.push(JSON.stringify(record) + "\n");
  pls.push(`  <lexeme>\n    <grapheme>${xml(word)}</grapheme>\n    <phoneme>${xml(form)}</phoneme>\n  </lexeme>\n`);
}
pls.push("</lexicon>\n");
mkdirSync(outDir, { recursive: true });
writeFileSync(join(outDir, "lexicon.tsv"), tsv.join(""));
writeFileSync(join(outDir, "lexicon.jsonl"), jsonl.join(""));
writeFileSync(join(outDir, "lexicon.pls"), pls.join(""));
