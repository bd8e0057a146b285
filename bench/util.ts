// Measuring helpers for the main-job bench: medians of repeated timings, a seeded sampler, child
// processes whose peak resident memory is read back, and number formatting for the tables.

import { spawn } from "node:child_process";
import { closeSync, mkdtempSync, openSync, readFileSync, rmSync } from "node:fs";
import { tmpdir } from "node:os";
import { join } from "node:path";
import stringWidth from "string-width";

/**
 * The median of a non-empty list (the mean of the two middle values for an even count). Zero is
 * returned as +0 whatever the order: the sort treats -0 and +0 as equal, so without `+ 0` the
 * result's sign of zero would depend on the input's order.
 */
export function median(xs: readonly number[]): number {
  if (xs.length === 0) throw new Error("median of nothing");
  const s = [...xs].sort((a, b) => a - b);
  const m = s.length >> 1;
  return (s.length % 2 === 1 ? s[m]! : (s[m - 1]! + s[m]!) / 2) + 0;
}

/**
 * Runs `fn` `warmup` times untimed (so the JIT has compiled the hot loop), then `reps` times
 * timed; returns every timing in milliseconds and their median. `fn` returns a checksum that is
 * accumulated so the work cannot be optimised away.
 */
export function timeRepeated(fn: () => number, reps: number, warmup = 1): { ms: number[]; median: number; checksum: number } {
  let checksum = 0;
  for (let k = 0; k < warmup; k++) checksum += fn();
  const ms: number[] = [];
  for (let k = 0; k < reps; k++) {
    const t0 = performance.now();
    checksum += fn();
    ms.push(performance.now() - t0);
  }
  return { ms, median: median(ms), checksum };
}

/** Mulberry32: a small seeded generator, so the sample is the same in every run. */
export function seededRandom(seed: number): () => number {
  let a = seed >>> 0;
  return () => {
    a = (a + 0x6d2b79f5) >>> 0;
    let t = a;
    t = Math.imul(t ^ (t >>> 15), t | 1);
    t ^= t + Math.imul(t ^ (t >>> 7), t | 61);
    return ((t ^ (t >>> 14)) >>> 0) / 4294967296;
  };
}

/** `k` distinct indices of 0…n-1 chosen with the seeded generator, in increasing order. */
export function sampleIndices(n: number, k: number, seed: number): number[] {
  const rnd = seededRandom(seed);
  const idx = Array.from({ length: n }, (_, i) => i);
  const take = Math.min(k, n);
  // Partial Fisher–Yates shuffle (Knuth, TAOCP vol. 2, Algorithm P).
  for (let i = 0; i < take; i++) {
    const j = i + Math.floor(rnd() * (n - i));
    const t = idx[i]!;
    idx[i] = idx[j]!;
    idx[j] = t;
  }
  return idx.slice(0, take).sort((a, b) => a - b);
}

export interface ChildRun {
  readonly code: number | null;
  readonly stdout: string;
  readonly stderr: string;
  /** Wall time of the child, spawn to exit, in milliseconds. */
  readonly wallMs: number;
  /** Peak resident set size of the child in bytes (from `process.resourceUsage().maxRSS`), null when unknown. */
  readonly maxRssBytes: number | null;
  /**
   * CPU time of the child (user + system, worker threads included) in milliseconds, null when
   * unknown: on a shared machine steadier than the wall time, which counts the time others ran.
   */
  readonly cpuMs: number | null;
  /** The main thread's share of `cpuMs` (Linux only, to 10 ms), null when unknown. */
  readonly mainCpuMs: number | null;
}

/**
 * Runs `node <rss wrapper> <script> args…` in a child process. The wrapper (bench/rss.ts) loads the
 * script in its own process and records `process.resourceUsage().maxRSS` when that process exits,
 * so the peak memory is the script's own, not the bench's.
 */
export function runChild(rssWrapper: string, script: string, args: readonly string[], opts: { cwd?: string; env?: NodeJS.ProcessEnv; stdoutFile?: string } = {}): Promise<ChildRun> {
  const dir = mkdtempSync(join(tmpdir(), "strata-bench-"));
  const rssFile = join(dir, "maxrss");
  // With `stdoutFile` the child writes its standard output straight into that file (as a shell
  // redirection would), so a large output costs the child, not a pipe into this process.
  const outFd = opts.stdoutFile !== undefined ? openSync(opts.stdoutFile, "w") : undefined;
  return new Promise((resolve, reject) => {
    const t0 = performance.now();
    const child = spawn(process.execPath, [rssWrapper, script, ...args], {
      cwd: opts.cwd,
      env: { ...process.env, ...opts.env, STRATA_BENCH_RSS_FILE: rssFile },
      stdio: ["ignore", outFd ?? "pipe", "pipe"],
    });
    if (outFd !== undefined) closeSync(outFd);
    let stdout = "";
    let stderr = "";
    child.stdout?.setEncoding("utf8").on("data", (c: string) => (stdout += c));
    child.stderr?.setEncoding("utf8").on("data", (c: string) => (stderr += c));
    child.on("error", reject);
    child.on("close", (code) => {
      const wallMs = performance.now() - t0;
      let maxRssBytes: number | null = null;
      let cpuMs: number | null = null;
      let mainCpuMs: number | null = null;
      try {
        // Node reports maxRSS in kilobytes (libuv uv_getrusage, ru_maxrss on Linux), CPU time in µs.
        const [rss, cpu, main] = readFileSync(rssFile, "utf8").trim().split(" ");
        maxRssBytes = Number(rss) * 1024;
        cpuMs = cpu !== undefined ? Number(cpu) / 1000 : null;
        mainCpuMs = main !== undefined && main !== "-" ? Number(main) / 1000 : null;
      } catch {
        maxRssBytes = null;
      }
      rmSync(dir, { recursive: true, force: true });
      resolve({ code, stdout, stderr, wallMs, maxRssBytes, cpuMs, mainCpuMs });
    });
  });
}

/** 1234567 → "1,234,567"; fractions keep `digits` places. */
export function fmt(x: number, digits = 0): string {
  return x.toLocaleString("en-US", { minimumFractionDigits: digits, maximumFractionDigits: digits });
}

/** Milliseconds as "812 ms" or "6.51 s". */
export function fmtMs(ms: number): string {
  return ms >= 1000 ? `${fmt(ms / 1000, 2)} s` : `${fmt(ms, ms < 10 ? 2 : 0)} ms`;
}

/** Bytes as MB (10^6), one decimal. */
export function fmtMB(bytes: number | null): string {
  return bytes === null ? "n/a" : `${fmt(bytes / 1e6, 1)} MB`;
}

/** A rate per second, compact: "1.23 M/s", "45.6 k/s", "789/s". */
export function fmtRate(perSecond: number): string {
  if (perSecond >= 1e6) return `${fmt(perSecond / 1e6, 2)} M/s`;
  if (perSecond >= 1e3) return `${fmt(perSecond / 1e3, 1)} k/s`;
  return `${fmt(perSecond, 0)}/s`;
}

/**
 * A plain-text table with aligned columns (first column left, the rest right-aligned). Widths are
 * terminal columns (string-width), so IPA with combining marks lines up.
 */
export function textTable(head: readonly string[], rows: readonly (readonly string[])[]): string {
  const w = head.map((h, i) => Math.max(stringWidth(h), ...rows.map((r) => stringWidth(r[i] ?? ""))));
  const pad = (c: string, n: number, left: boolean): string => (left ? c + " ".repeat(n - stringWidth(c)) : " ".repeat(n - stringWidth(c)) + c);
  const line = (r: readonly string[]): string =>
    r.map((c, i) => pad(c, w[i]!, i === 0)).join("  ").trimEnd();
  return [line(head), w.map((n) => "-".repeat(n)).join("  "), ...rows.map(line)].join("\n");
}

/** The command line as users run it: the bundle the `strata` bin points at (scripts/bundle.mjs). */
export const strataCli = (root: string): string => join(root, "dist", "bun", "main.js");
