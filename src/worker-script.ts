// Where a compiled worker-thread script lies: in the folder of the module that starts it, both in
// tsc's output (dist/src/lexicon/worker.js beside chunks.js) and in the bundle (scripts/bundle.mjs:
// every entry and chunk in dist/bun). Running from the TypeScript sources (the tests) there is none.

import { existsSync } from "node:fs";
import { dirname, join } from "node:path";
import { fileURLToPath } from "node:url";

/** The worker script `name` beside the module at `moduleUrl` (its `import.meta.url`), or undefined from TypeScript sources or when it is missing. */
export function workerScript(moduleUrl: string, name: string): string | undefined {
  const here = fileURLToPath(moduleUrl);
  if (!here.endsWith(".js")) return undefined;
  const w = join(dirname(here), name);
  return existsSync(w) ? w : undefined;
}
