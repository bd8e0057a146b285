// `strata accept BUILD -o BASELINE`: make a reviewed build the baseline later comparisons use
// (atomically; the logic is in src/regress/accept.ts).

import type { Command } from "commander";
import { acceptBuild } from "../regress/accept.js";
import { printDiagnostics } from "./common.js";

export function registerAccept(program: Command): void {
  program
    .command("accept")
    .description("make a build the baseline: copy its build.json and each variety's entries into the baseline folder, atomically")
    .argument("<build>", "the build folder to accept (build/<lexicon>/)")
    .requiredOption("-o, --out <dir>", "the baseline folder (recommended: <lexicon folder>/baseline, committed)")
    .option("-q, --quiet", "print nothing but errors", false)
    .addHelpText("after", `
Exit codes: 0 accepted; 1 the build cannot be used (not a build, older format, truncated) or the
folder is not a baseline; the previous baseline is then left as it was.

Examples:
  strata accept build/demo -o lexicons/demo/baseline
  git add lexicons/demo/baseline && git commit -m "demo: accept the flapping change"`)
    .action(async (build: string, o: { out: string; quiet: boolean }) => {
      const res = await acceptBuild(build, o.out);
      printDiagnostics(res.diagnostics);
      if (res.diagnostics.length > 0) {
        process.exitCode = 1;
        return;
      }
      if (!o.quiet) process.stdout.write(`accepted ${res.varieties.map((v) => `${v.name} (${v.entries} entries)`).join(", ")} as the baseline in ${o.out}\n`);
      process.exitCode = 0;
    });
}
