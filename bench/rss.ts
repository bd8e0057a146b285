// Child-process wrapper for the bench: `node rss.js SCRIPT ARGS…` runs SCRIPT in this process as if
// started directly, and at exit writes this process's peak resident set size (kB) and its CPU time
// (user + system, µs, worker threads included) to the file named by STRATA_BENCH_RSS_FILE, so the
// parent can read the child's own peak memory and CPU time.

import { writeFileSync } from "node:fs";
import { resolve } from "node:path";
import { pathToFileURL } from "node:url";

const script = process.argv[2];
if (script === undefined) {
  process.stderr.write("usage: node rss.js SCRIPT [ARGS…]\n");
  process.exit(2);
}
const out = process.env["STRATA_BENCH_RSS_FILE"];
process.on("exit", () => {
  const u = process.resourceUsage();
  if (out !== undefined) writeFileSync(out, `${u.maxRSS} ${u.userCPUTime + u.systemCPUTime}`);
});
// The script sees the arguments it would see if started as `node SCRIPT ARGS…`.
process.argv = [process.argv[0]!, resolve(script), ...process.argv.slice(3)];
await import(pathToFileURL(resolve(script)).href);
