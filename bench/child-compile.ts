// Bench child process: loads a grammar and compiles it with a cache folder, then prints one JSON
// line (times, cache state, machine sizes). Run apart from the bench so its peak memory is its own.
// Usage: node dist/bench/child-compile.js GRAMMAR CACHE_DIR [subset|prosody|full]

import { loadGrammarCached } from "../src/grammar/index.js";
import { compileGrammar } from "../src/compile/index.js";
import { formatDiagnostic } from "../src/diagnostics.js";
import { prosodyGrammar, subsetGrammar } from "./subset.js";

const [grammarPath, cacheDir, cut = "full"] = process.argv.slice(2);
if (grammarPath === undefined || cacheDir === undefined) {
  process.stderr.write("usage: child-compile GRAMMAR CACHE_DIR [full|subset|prosody]\n");
  process.exit(2);
}
const t0 = performance.now();
// The same loading path as `strata build` with a cache folder (checked grammars are cached too).
const loaded = loadGrammarCached(grammarPath, cacheDir);
if (loaded.grammar === undefined || loaded.inventory === undefined || loaded.diagnostics.some((d) => d.severity === "error")) {
  process.stderr.write(loaded.diagnostics.map(formatDiagnostic).join("\n") + "\n");
  process.exit(1);
}
const grammar = cut === "subset" ? subsetGrammar(loaded.grammar) : cut === "prosody" ? prosodyGrammar(loaded.grammar) : loaded.grammar;
const t1 = performance.now();
const r = compileGrammar(grammar, loaded.inventory, { cacheDir });
const t2 = performance.now();
if (r.compiled === null) {
  process.stderr.write(r.diagnostics.map(formatDiagnostic).join("\n") + "\n");
  process.exit(1);
}
const c = r.compiled;
const cpuMs = (): number => { const u = process.cpuUsage(); return (u.user + u.system) / 1000; };
process.stdout.write(
  JSON.stringify({
    loadMs: t1 - t0,
    compileMs: t2 - t1,
    totalMs: t2 - t0,
    // CPU time of this process (user + system): on a shared machine the wall time includes waiting.
    cpuMs: cpuMs(),
    cache: c.cache,
    timings: c.timings,
    alphabet: c.alphabet.size,
    steps: c.steps,
    preferred: c.preferredSize,
    variants: c.variantsSize,
    runnerKinds: c.preferred.kinds,
    threads: c.threads,
  }) + "\n",
);
