// The bench's baseline: the script a lexicon team without a rule compiler would write — read the
// lexicon CSV, parse it with csv-parse, run a hand-written regular-expression cascade (bench/
// regex-cascade.ts: dark-l, flapping, aspiration, approximant devoicing, nasalisation) on each IPA
// string and write word, narrow and broad as TSV to stdout. Usage: node dist/bench/inhouse.js LEXICON_CSV

import { readFileSync } from "node:fs";
import { parse } from "csv-parse/sync";
import { regexCascade } from "./regex-cascade.js";

const file = process.argv[2];
if (file === undefined) {
  process.stderr.write("usage: inhouse LEXICON_CSV\n");
  process.exit(2);
}
const records = parse(readFileSync(file, "utf8"), { bom: true, relax_column_count: true, skip_empty_lines: true }) as string[][];
const header = records[0] ?? [];
const iWord = header.indexOf("word");
const iPron = header.indexOf("pron");
const out: string[] = ["word\tnarrow\tbroad\n"];
for (let k = 1; k < records.length; k++) {
  const r = records[k]!;
  const broad = (r[iPron] ?? "").replace(/\s+/g, "");
  out.push(`${r[iWord]}\t${regexCascade(broad)}\t${broad}\n`);
}
process.stdout.write(out.join(""));
