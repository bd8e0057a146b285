// A small in-process measurement of the two machine-speed ratios of the main-job section (table
// walk ÷ composed machine, composed machine ÷ regex cascade) in CPU time, medians of many
// repetitions: for working on the runner without running the whole section (whose in-process
// figures are wall-time medians of 5, easily disturbed on a shared machine).
// Usage: npm run build && node dist/bench/runner-speed.js [REPS]

import { join } from "node:path";
import { loadGrammar } from "../src/grammar/index.js";
import { compileGrammar, type BatchResult, type Compiled } from "../src/compile/index.js";
import { formatDiagnostic } from "../src/diagnostics.js";
import { renderIpa, symbolView } from "../src/lexicon/render.js";
import { packSymbols, packageRootFrom, readCmuWords, writeCmuFolder, type SymbolArrays } from "./cmu.js";
import { regexCascade } from "./regex-cascade.js";
import { prosodyGrammar } from "./subset.js";
import { randomDfa, walk } from "./table-walk.js";
import { fmt, median } from "./util.js";

const reps = Number(process.argv[2] ?? "40");
const root = packageRootFrom(import.meta.url);
const loaded = loadGrammar(join(root, "lexicons", "en-us", "grammar.strata"));
if (loaded.grammar === undefined || loaded.inventory === undefined) throw new Error(loaded.diagnostics.map(formatDiagnostic).join("\n"));
const inv = loaded.inventory;
const compile = (g: typeof loaded.grammar): Compiled => {
  const r = compileGrammar(g!, inv, { cacheDir: join(root, "build", "bench", "cache") });
  if (r.compiled === null) throw new Error(r.diagnostics.map(formatDiagnostic).join("\n"));
  return r.compiled;
};
const c = compile(loaded.grammar);
const folder = writeCmuFolder(root);
const { words } = await readCmuWords(folder.csv, inv);
const all = packSymbols(words, c.encode);
// The cascade's input: the broad syllabified and stressed forms (as the main-job section makes them).
const prosody = compile(prosodyGrammar(loaded.grammar));
const view = symbolView(prosody.alphabet, inv);
const broad = packSymbols(words, prosody.encode).views.map((v) => {
  const out: number[] = [];
  if (!prosody.preferred.run(v, out)) throw new Error("prosody rejected an entry");
  return renderIpa(out, view);
});

/** CPU milliseconds of each of `reps` calls (after three untimed ones): median and minimum. */
function cpu(fn: () => number): { median: number; min: number; sum: number } {
  let sum = fn() + fn() + fn();
  const ms: number[] = [];
  for (let k = 0; k < reps; k++) {
    const t0 = process.cpuUsage();
    sum += fn();
    const d = process.cpuUsage(t0);
    ms.push((d.user + d.system) / 1000);
  }
  return { median: median(ms), min: Math.min(...ms), sum };
}

let room: BatchResult | undefined;
const runAll = (a: SymbolArrays): number => {
  room = c.preferred.runBatch(a.ids, a.at, room);
  return room.outAt[room.outAt.length - 1]!;
};
const machine = cpu(() => runAll(all));
const dfa = randomDfa(Math.max(1, c.preferredSize.states), c.alphabet.size, 20240611);
const bare = cpu(() => walk(dfa, all.ids, all.at));
const regex = cpu(() => {
  let n = 0;
  for (const b of broad) n += regexCascade(b).length;
  return n;
});
const n = all.ids.length;
const line = (name: string, t: { median: number; min: number }, rate: string): string => `${name.padEnd(24)} median ${fmt(t.median, 2).padStart(7)} ms CPU (min ${fmt(t.min, 2)}), ${rate}\n`;
process.stdout.write(
  `${fmt(words.length)} entries, ${fmt(n)} symbols, ${c.preferredSize.states} states × ${c.alphabet.size} symbols, runner ${c.preferred.kinds.join(" ")}, ${reps} repetitions\n` +
    line("composed machine", machine, `${fmt(n / machine.median / 1000, 1)} M symbols/s`) +
    line("bare table walk", bare, `${fmt(n / bare.median / 1000, 1)} M symbols/s`) +
    line("regex cascade (5 rules)", regex, `${fmt(words.length / regex.median, 1)} k entries/s`) +
    `table walk ÷ machine: ${fmt(machine.median / bare.median, 2)}× (target ≤ 5×); machine ÷ regex cascade: ${fmt(regex.median / machine.median, 2)}× (target ≥ 10×)\n`,
);
