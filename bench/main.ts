// `npm run bench`: runs each bench section in turn. A section is a function that measures and
// prints its own figures and returns whether its output checks passed; the process exits 1 when
// any check fails, never because of a timing.

import { benchFst } from "./fst.js";
import { benchMainJob } from "./main-job.js";
import { benchAnalyze } from "./analyze.js";

const sections: readonly { readonly name: string; readonly run: () => Promise<boolean> | boolean | void | Promise<void> }[] = [
  { name: "fst", run: () => { benchFst(); } },
  { name: "main job", run: async () => (await benchMainJob()).ok },
  { name: "analyze", run: () => benchAnalyze() },
];

let failed = false;
for (const section of sections) {
  const ok = await section.run();
  if (ok === false) {
    failed = true;
    console.log(`bench section '${section.name}': an output check failed`);
  }
  console.log("");
}
process.exitCode = failed ? 1 : 0;
