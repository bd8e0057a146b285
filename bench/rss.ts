// Child-process wrapper for the bench: `node rss.js SCRIPT ARGS…` runs SCRIPT in this process as if
// started directly, and at exit writes this process's peak resident set size (kB), its CPU time
// (user + system, µs, every thread included) and, on Linux, its main thread's CPU time (µs, or "-"
// where unknown) to the file named by STRATA_BENCH_RSS_FILE, so the parent can read the child's
// own peak memory and CPU time, and how much of that CPU the main thread took.

import { readFileSync, writeFileSync } from "node:fs";
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
  if (out !== undefined) writeFileSync(out, `${u.maxRSS} ${u.userCPUTime + u.systemCPUTime} ${mainThreadCpuUs() ?? "-"}`);
});

/**
 * The main thread's CPU time (user + system) in µs, from /proc/self/task/PID/stat (Linux; the
 * main thread's task id is the process id), or undefined where there is no such file. proc(5):
 * utime and stime are fields 14 and 15, counted after the parenthesised name (which may hold
 * spaces), in clock ticks of 1/100 s (USER_HZ, 100 on Linux; from memory).
 */
function mainThreadCpuUs(): number | undefined {
  try {
    const stat = readFileSync(`/proc/self/task/${process.pid}/stat`, "utf8");
    const f = stat.slice(stat.lastIndexOf(")") + 2).split(" ");
    const ticks = Number(f[11]) + Number(f[12]);
    return Number.isFinite(ticks) ? ticks * 10_000 : undefined;
  } catch {
    return undefined;
  }
}
// The script sees the arguments it would see if started as `node SCRIPT ARGS…`.
process.argv = [process.argv[0]!, resolve(script), ...process.argv.slice(3)];
await import(pathToFileURL(resolve(script)).href);
