// The stages of one build on their own (`node dist/bench/stages.js [reps]`): the stage table of the
// main job's end-to-end section (bench/e2e.ts) without its child processes, for measuring a change
// to one stage. Uses the CMU folder and machine cache the main job writes (build/bench), writing
// them first when absent. Each stage's figure is the fastest of `reps` runs (default 1) by CPU time.

import { existsSync, mkdirSync } from "node:fs";
import { join } from "node:path";
import { loadGrammar } from "../src/grammar/index.js";
import { formatDiagnostic } from "../src/diagnostics.js";
import { packageRootFrom, writeCmuFolder } from "./cmu.js";
import { buildStages, printStages, type Stage } from "./e2e.js";

const root = packageRootFrom(import.meta.url);
const reps = Math.max(1, Number(process.argv[2] ?? 1));
const work = join(root, "build", "bench");
mkdirSync(work, { recursive: true });
const csv = join(work, "cmu", "lexicon.csv");
if (!existsSync(csv)) writeCmuFolder(root);
const loaded = loadGrammar(join(root, "lexicons", "en-us", "grammar.strata"));
if (loaded.grammar === undefined || loaded.inventory === undefined || loaded.diagnostics.some((d) => d.severity === "error")) {
  throw new Error(loaded.diagnostics.map(formatDiagnostic).join("\n"));
}
const failures: string[] = [];
let best: Stage[] | undefined;
for (let k = 0; k < reps; k++) {
  const stages = await buildStages({ csv, grammar: loaded.grammar, inventory: loaded.inventory, cacheDir: join(work, "cache") }, join(work, "stages"), failures);
  best = best === undefined ? stages : best.map((b, i) => (stages[i]!.cpu < b.cpu ? stages[i]! : b));
}
printStages(best!);
for (const f of failures) console.log(`FAILED: ${f}`);
process.exitCode = failures.length > 0 ? 1 : 0;
