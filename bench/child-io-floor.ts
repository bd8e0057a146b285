// Bench child process, the I/O floor of `strata build`: reads the lexicon CSV with the same reader
// (tokenising every pronunciation) and writes the same kind of TSV lines with no rules applied
// (narrow = broad = the pronunciation as written), streamed and written whole like the runner does.
// Usage: node dist/bench/child-io-floor.js LEXICON_CSV GRAMMAR OUT_TSV

import { loadGrammar } from "../src/grammar/index.js";
import { formatDiagnostic } from "../src/diagnostics.js";
import { writeFileAtomic } from "../src/emit/atomic.js";
import { formatTsvEntry, tsvHeader } from "../src/emit/tsv.js";
import { Channel } from "../src/lexicon/channel.js";
import { readLexicon } from "../src/lexicon/read.js";

const [csv, grammarPath, out] = process.argv.slice(2);
if (csv === undefined || grammarPath === undefined || out === undefined) {
  process.stderr.write("usage: child-io-floor LEXICON_CSV GRAMMAR OUT_TSV\n");
  process.exit(2);
}
// The inventory comes with the grammar (as in `strata build`); the rules are not used.
const loaded = loadGrammar(grammarPath);
if (loaded.inventory === undefined) {
  process.stderr.write(loaded.diagnostics.map(formatDiagnostic).join("\n") + "\n");
  process.exit(1);
}
const ch = new Channel<string>();
const written = writeFileAtomic(out, ch);
ch.push(tsvHeader());
let rows = 0;
let rejects = 0;
for await (const item of readLexicon(csv, { inventory: loaded.inventory })) {
  if (item.kind === "reject") {
    rejects++;
    continue;
  }
  rows++;
  ch.push(formatTsvEntry({ key: item.id ?? item.word, word: item.word, narrow: item.pron, broad: item.pron }));
  if (ch.backlog > 4096) await new Promise((res) => setImmediate(res));
}
ch.close();
await written;
process.stdout.write(JSON.stringify({ rows, rejects }) + "\n");
