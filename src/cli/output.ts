// Everything the commands print: diagnostics with their source line (command-line problems show
// the command line), colour only when wanted, standard output that survives a closed pipe, and
// one-file outputs (`-o FILE`) written whole.

import { existsSync, readFileSync, statSync } from "node:fs";
import pc from "picocolors";
import { renderDiagnostic, type Diagnostic } from "../diagnostics.js";
import { writeFileAtomic } from "../emit/atomic.js";
import { COMMAND_LINE, commandLineText } from "./cmdline.js";

let colourFlag: boolean | undefined;

/** `--color` (true), `--no-color` (false) or neither (undefined: a terminal and NO_COLOR unset). */
export function setColour(flag: boolean | undefined): void {
  colourFlag = flag;
}

/** Whether to colour what goes to `stream`. */
export function useColour(stream: { isTTY?: boolean } = process.stderr): boolean {
  if (colourFlag !== undefined) return colourFlag;
  const noColor = process.env["NO_COLOR"];
  return stream.isTTY === true && (noColor === undefined || noColor === "");
}

/** picocolors, switched on or off for `stream`. */
export function colours(stream: { isTTY?: boolean } = process.stderr): ReturnType<typeof pc.createColors> {
  return pc.createColors(useColour(stream));
}

/** Diagnostics rendered with their source line and a caret (one block each, each ending in a newline). */
export function renderDiagnostics(ds: readonly Diagnostic[], colour = false): string {
  const texts = new Map<string, string | undefined>();
  const source = (file: string): string | undefined => {
    if (file === COMMAND_LINE) return commandLineText();
    if (!texts.has(file)) {
      let t: string | undefined;
      try {
        t = existsSync(file) && statSync(file).isFile() && statSync(file).size < 64 * 1024 * 1024 ? readFileSync(file, "utf8") : undefined;
      } catch {
        t = undefined;
      }
      texts.set(file, t);
    }
    return texts.get(file);
  };
  const c = pc.createColors(colour);
  return ds.map((d) => (d.severity === "error" ? c.red : c.yellow)(renderDiagnostic(d, source(d.file))) + "\n").join("");
}

/** Prints diagnostics to standard error (warnings left out when `quiet`; errors always). */
export function printDiagnostics(ds: readonly Diagnostic[], opts: { quiet?: boolean; stream?: NodeJS.WritableStream & { isTTY?: boolean } } = {}): void {
  const stream = opts.stream ?? process.stderr;
  const shown = opts.quiet === true ? ds.filter((d) => d.severity === "error") : ds;
  if (shown.length > 0) stream.write(renderDiagnostics(shown, useColour(stream)));
}

/** Writes to standard output respecting back-pressure (await the result when it is a promise). */
export function writeOut(text: string): Promise<void> | void {
  if (text === "") return;
  if (!process.stdout.write(text)) return new Promise((res) => process.stdout.once("drain", () => res()));
}

let guarded = false;

/**
 * A reader that stops early (`strata transcribe … | head`) closes the pipe: the command ends quietly,
 * with the exit code it had so far (0 when nothing went wrong), instead of crashing on EPIPE.
 */
export function guardPipes(): void {
  if (guarded) return;
  guarded = true;
  const onError = (err: NodeJS.ErrnoException): void => {
    if (err.code === "EPIPE" || err.code === "ERR_STREAM_DESTROYED") process.exit(typeof process.exitCode === "number" ? process.exitCode : 0);
    throw err;
  };
  process.stdout.on("error", onError);
  process.stderr.on("error", (err: NodeJS.ErrnoException) => {
    if (err.code !== "EPIPE") throw err;
  });
}

/** A one-file output: to `out` whole (temporary file, then rename) when given, else to standard output. */
export async function emit(text: string, out?: string): Promise<void> {
  if (out === undefined || out === "-") await writeOut(text);
  else await writeFileAtomic(out, text);
}

/** Prints a command's outcome and sets the process exit code. */
export async function printOutcome(o: { stdout: string; stderr: string; exitCode: number }, out?: string): Promise<void> {
  if (o.stdout !== "") await emit(o.stdout, out);
  if (o.stderr !== "") process.stderr.write(o.stderr);
  process.exitCode = o.exitCode;
}
