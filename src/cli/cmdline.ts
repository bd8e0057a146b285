// Problems on the command line as positioned diagnostics: the file is `command line`, the line is the
// arguments after `strata` joined by spaces, the column is where the offending argument starts.

import { diagnostic, type Diagnostic } from "../diagnostics.js";

export const COMMAND_LINE = "command line";

let args: readonly string[] = [];

/** Records the arguments after the program name (main does this once; tests may too). */
export function setCommandLine(a: readonly string[]): void {
  args = [...a];
}

/** The command line as the diagnostics show it (the source line under the message). */
export function commandLineText(): string {
  return args.join(" ");
}

const cps = (s: string): number => Array.from(s).length;

/**
 * Where an argument sits: the value given to one of `flags` (`-o X`, `--out X`, `--out=X`), else the
 * first argument equal to `value`, else the flag itself; else the end of the line (something missing).
 */
export function argPosition(value: string | undefined, flags: readonly string[] = []): { column: number; length: number } {
  const starts: number[] = [];
  let col = 1;
  for (const a of args) {
    starts.push(col);
    col += cps(a) + 1;
  }
  const end = { column: args.length > 0 ? col : 1, length: 1 };
  for (let i = 0; i < args.length; i++) {
    const a = args[i]!;
    for (const f of flags) {
      if (a === f && i + 1 < args.length && (value === undefined || args[i + 1] === value)) return { column: starts[i + 1]!, length: Math.max(1, cps(args[i + 1]!)) };
      if (a.startsWith(`${f}=`) && (value === undefined || a.slice(f.length + 1) === value)) return { column: starts[i]! + cps(f) + 1, length: Math.max(1, cps(a) - cps(f) - 1) };
      if (f.length === 2 && !f.startsWith("--") && a.startsWith(f) && a.length > 2 && (value === undefined || a.slice(2) === value)) return { column: starts[i]! + 2, length: Math.max(1, cps(a) - 2) };
    }
  }
  if (value !== undefined) {
    const i = args.indexOf(value);
    if (i >= 0) return { column: starts[i]!, length: Math.max(1, cps(value)) };
  }
  for (let i = 0; i < args.length; i++) {
    const a = args[i]!;
    if (flags.some((f) => a === f || a.startsWith(`${f}=`))) return { column: starts[i]!, length: cps(a) };
  }
  return end;
}

/** An error about an argument: `command line:1:COL: error: MESSAGE [code]`. */
export function commandLineError(code: string, message: string, value?: string, flags: readonly string[] = []): Diagnostic {
  const { column, length } = argPosition(value, flags);
  return diagnostic("error", code, message, { file: COMMAND_LINE, line: 1, column, length });
}

/**
 * Columns of a run of positional arguments (e.g. the segments of `strata classes`): where they sit on
 * the command line, or, when they are not on it (a command called in-process), their places in the
 * run joined by spaces.
 */
export function runColumns(values: readonly string[]): number[] {
  const starts: number[] = [];
  let col = 1;
  for (const a of args) {
    starts.push(col);
    col += cps(a) + 1;
  }
  for (let i = args.length - values.length; i >= 0; i--) {
    if (values.every((v, k) => args[i + k] === v)) return values.map((_, k) => starts[i + k]!);
  }
  const out: number[] = [];
  let c = 1;
  for (const v of values) {
    out.push(c);
    c += cps(v) + 1;
  }
  return out;
}
