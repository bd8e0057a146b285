// Bench child: the floor a comparison is measured against — read both builds' JSON Lines files
// (every variety) line by line and parse each record, nothing else. With "raw" only the lines are
// split (no JSON parsing). Prints JSON: lines read, and entries whose narrow form or variant set
// differ between the two builds (matched by line; the bench's lexicons are the same file).

import { createReadStream } from "node:fs";
import { join } from "node:path";
import { StringDecoder } from "node:string_decoder";

const [oldDir, newDir, varietiesArg, mode] = process.argv.slice(2) as [string, string, string, string | undefined];
const raw = mode === "raw";

async function* lines(file: string): AsyncGenerator<string[]> {
  const dec = new StringDecoder("utf8");
  let rest = "";
  for await (const chunk of createReadStream(file, { highWaterMark: 1 << 20 })) {
    const text = rest + dec.write(chunk as Buffer);
    const parts = text.split("\n");
    rest = parts.pop()!;
    yield parts;
  }
}

let read = 0;
let differ = 0;
for (const v of varietiesArg.split(",")) {
  const a = lines(join(oldDir, v, "lexicon.jsonl"))[Symbol.asyncIterator]();
  const b = lines(join(newDir, v, "lexicon.jsonl"))[Symbol.asyncIterator]();
  let qa: string[] = [];
  let qb: string[] = [];
  let doneA = false;
  let doneB = false;
  for (;;) {
    if (qa.length === 0 && !doneA) { const r = await a.next(); if (r.done) doneA = true; else qa = r.value; }
    if (qb.length === 0 && !doneB) { const r = await b.next(); if (r.done) doneB = true; else qb = r.value; }
    if (qa.length === 0 && qb.length === 0 && doneA && doneB) break;
    const n = Math.min(qa.length, qb.length) || Math.max(qa.length, qb.length);
    for (let i = 0; i < n; i++) {
      const la = qa[i];
      const lb = qb[i];
      read += (la !== undefined ? 1 : 0) + (lb !== undefined ? 1 : 0);
      if (raw || la === undefined || lb === undefined) continue;
      const x = JSON.parse(la) as { narrow: string; variants: string[] };
      const y = JSON.parse(lb) as { narrow: string; variants: string[] };
      if (x.narrow !== y.narrow || [...x.variants].sort().join(" ") !== [...y.variants].sort().join(" ")) differ++;
    }
    qa = qa.slice(n);
    qb = qb.slice(n);
  }
}
process.stdout.write(JSON.stringify({ read, differ: raw ? null : differ }) + "\n");
