// `npm run bench`: runs each bench section in turn. A section is a function that measures and
// prints its own figures and returns whether its output checks passed; the process exits 1 when
// any check fails, never because of a timing.

import { benchFst } from "./fst.js";
import { benchMainJob } from "./main-job.js";
import { benchRegress } from "./regress.js";
import { benchAnalyze } from "./analyze.js";
import { benchScaling } from "./scaling.js";
import { packageRootFrom } from "./cmu.js";

const sections: readonly { readonly name: string; readonly run: () => Promise<boolean> | boolean | void | Promise<void> }[] = [
  { name: "fst", run: () => { benchFst(); } },
  { name: "main job", run: async () => (await benchMainJob()).ok },
  { name: "regress", run: async () => (await benchRegress()).ok },
  { name: "analyze", run: () => benchAnalyze() },
  { name: "grammar-size scaling", run: async () => (await benchScaling(packageRootFrom(import.meta.url), (s = "") => void process.stdout.write(s + "\n"))).ok },
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
