// The command line as a few files: esbuild bundles tsc's output (dist/src) into dist/bun, with the
// command-line entry and the three worker-thread scripts as entries, the code they share in chunks,
// and each command's code in its own chunk (loaded when that command runs, as cli/main.ts asks).
//
// Why: Node loads an ES module at a time (a file read, a resolution and a compile each), and
// `strata transcribe` loads some 150 of tsc's modules; that was about 60 ms of a whole-dictionary
// run that takes 0.6 s (figures in DEVELOPERS.md, "The bundle"). Everything the package runs goes
// through dist/bun (the bin, npm start, the bench); the tests run the sources, and
// tests/cli/bundle.test.ts checks the bundle's outputs against tsc's byte for byte.
//
// Usage: node scripts/bundle.mjs [FROM] [TO] (default dist/src, dist/bun; TO is replaced whole).

import { build } from "esbuild";
import { existsSync, rmSync } from "node:fs";
import { join, resolve } from "node:path";

const [from = "dist/src", to = "dist/bun"] = process.argv.slice(2);
const entries = { main: "cli/main.js", worker: "lexicon/worker.js", "check-worker": "lexicon/check-worker.js", "compose-worker": "compile/compose-worker.js" };
for (const rel of Object.values(entries)) {
  if (!existsSync(join(from, rel))) {
    process.stderr.write(`bundle: ${join(from, rel)} is missing (run tsc first)\n`);
    process.exit(1);
  }
}
rmSync(to, { recursive: true, force: true });
await build({
  entryPoints: Object.fromEntries(Object.entries(entries).map(([name, rel]) => [name, resolve(from, rel)])),
  outdir: to,
  bundle: true,
  splitting: true,
  format: "esm",
  platform: "node",
  target: "node20",
  // jsonc-parser's "main" is a UMD build that requires its parts at run time; its ES module build bundles.
  mainFields: ["module", "main"],
  // Whitespace and syntax only: a crash's stack trace keeps the functions' names.
  minifyWhitespace: true,
  minifySyntax: true,
  sourcemap: "linked",
  // The CommonJS packages (commander, csv-parse, …) require Node's own modules; an ES module has no `require`.
  banner: { js: "import { createRequire as __strataRequire } from 'node:module'; const require = __strataRequire(import.meta.url);" },
  logLevel: "warning",
});
