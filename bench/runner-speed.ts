// A small in-process measurement of the preferred runner's batch loop on the whole CMU dictionary
// (the en-us machine from the bench's cache folder), against the bare table walk: CPU time per
// repetition, median of many. For working on the runner without running the whole bench section.
// Usage: npm run build && node dist/bench/runner-speed.js [REPS]

import { join } from "node:path";
import { loadGrammar } from "../src/grammar/index.js";
import { compileGrammar, type BatchResult } from "../src/compile/index.js";
import { formatDiagnostic } from "../src/diagnostics.js";
import { packSymbols, packageRootFrom, readCmuWords, writeCmuFolder } from "./cmu.js";
import { randomDfa, walk } from "./table-walk.js";
import { fmt, median } from "./util.js";

const reps = Number(process.argv[2] ?? "60");
const root = packageRootFrom(import.meta.url);
const loaded = loadGrammar(join(root, "lexicons", "en-us", "grammar.strata"));
if (loaded.grammar === undefined || loaded.inventory === undefined) throw new Error(loaded.diagnostics.map(formatDiagnostic).join("\n"));
const r = compileGrammar(loaded.grammar, loaded.inventory, { cacheDir: join(root, "build", "bench", "cache") });
if (r.compiled === null) throw new Error(r.diagnostics.map(formatDiagnostic).join("\n"));
const c = r.compiled;
const folder = writeCmuFolder(root);
const { words } = await readCmuWords(folder.csv, loaded.inventory);
const all = packSymbols(words, c.encode);

/** CPU milliseconds of each of `reps` calls (after two untimed ones), and their median. */
function cpu(fn: () => number): { median: number; min: number; sum: number } {
  let sum = fn() + fn();
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
const machine = cpu(() => {
  room = c.preferred.runBatch(all.ids, all.at, room);
  return room.outAt[room.outAt.length - 1]!;
});
const dfa = randomDfa(Math.max(1, c.preferredSize.states), c.alphabet.size, 20240611);
const bare = cpu(() => walk(dfa, all.ids, all.at));
const n = all.ids.length;
process.stdout.write(
  `${fmt(words.length)} entries, ${fmt(n)} symbols, ${c.preferredSize.states} states × ${c.alphabet.size} symbols, runner ${c.preferred.kinds.join(" ")}\n` +
    `machine: median ${fmt(machine.median, 2)} ms CPU (min ${fmt(machine.min, 2)}), ${fmt(n / machine.median / 1000, 1)} M symbols/s; checksum ${machine.sum}\n` +
    `walk:    median ${fmt(bare.median, 2)} ms CPU (min ${fmt(bare.min, 2)}), ${fmt(n / bare.median / 1000, 1)} M symbols/s\n` +
    `walk ÷ machine: ${fmt(machine.median / bare.median, 2)}×\n`,
);
