// The program around the commands: version from package.json, commander's own errors rendered in the
// one message style (exit 1), file-system errors as one positioned line, anything else an internal
// error (exit 70, one line asking for a report; the stack only with STRATA_DEBUG=1).

import { readFileSync } from "node:fs";
import { join } from "node:path";
import { Command, CommanderError } from "commander";
import { formatDiagnostic, StrataError } from "../diagnostics.js";
import { PlsError } from "../emit/pls.js";
import { setProjectRoot } from "../grammar/index.js";
import { commandLineError, setCommandLine } from "./cmdline.js";
import { packageRoot } from "./common.js";
import { EXIT } from "./exit.js";
import { guardPipes, renderDiagnostics, setColour, useColour } from "./output.js";
import { fileSystemDiagnostic } from "./paths.js";

/** The package's version, from its package.json. */
export function packageVersion(): string {
  const pkg = JSON.parse(readFileSync(join(packageRoot(), "package.json"), "utf8")) as { version?: string };
  return pkg.version ?? "0.0.0";
}

/** The `strata` program with no commands yet (main.ts registers them). */
export function createProgram(): Command {
  const program = new Command();
  program
    .name("strata")
    .description("Compile SPE-style phonological rules into finite-state transducers and run pronunciation lexicons through them.")
    .version(packageVersion(), "-v, --version", "print the version")
    .helpOption("-h, --help", "show help")
    .showSuggestionAfterError(true)
    .exitOverride()
    .configureOutput({ outputError: () => undefined })
    .hook("preAction", (_top, action) => setColour(action.opts()["color"] as boolean | undefined))
    .hook("preAction", (_top, action) => setProjectRoot(action.opts()["root"] as string | undefined))
    .hook("postAction", () => setProjectRoot(undefined));
  program.addHelpText("after", "\nExit codes: 0 success, 1 bad input, 3 rows rejected, 4 checks failed, 70 internal error.\nRun 'strata COMMAND --help' for a command's options and examples.\n");
  return program;
}

/** Commander's message (`error: unknown option '--x'`) as a sentence and the argument it is about. */
export function commanderProblem(err: CommanderError): { message: string; value?: string; flags?: string[]; code: string } {
  let text = err.message.replace(/^error:\s*/, "").trim();
  const suggestion = /\n\(Did you mean (.*)\?\)$/.exec(text);
  if (suggestion) text = text.slice(0, suggestion.index).trim();
  const hint = suggestion ? ` (did you mean ${suggestion[1]}?)` : "";
  const invalid = /^option '([^']+)' argument '([\s\S]*)' is invalid\.\s*([\s\S]*)$/.exec(text);
  if (invalid) {
    const flag = invalid[1]!.split(/[ ,]+/).find((f) => f.startsWith("--")) ?? invalid[1]!.split(" ")[0]!;
    const why = invalid[3]!.trim().replace(/^Allowed choices are (.*)\.$/, "It must be one of $1.");
    const flags = invalid[1]!.split(/[ ,]+/).filter((f) => f.startsWith("-"));
    return { message: `Option ${flag} does not take '${invalid[2]}'. ${why}`.trim(), value: invalid[2]!, flags, code: "cli/bad-option-value" };
  }
  const argInvalid = /^command-argument value '([\s\S]*)' is invalid for argument '([^']+)'\.\s*([\s\S]*)$/.exec(text);
  if (argInvalid) return { message: `The argument ${argInvalid[2]} does not take '${argInvalid[1]}'. ${argInvalid[3]!.trim()}`.trim(), value: argInvalid[1]!, code: "cli/bad-argument" };
  const quoted = /'([^']*)'/.exec(text)?.[1];
  const sentence = text.charAt(0).toUpperCase() + text.slice(1).replace(/\.$/, "");
  const code = "cli/" + err.code.replace(/^commander\./, "").replace(/[A-Z]/g, (c) => `-${c.toLowerCase()}`);
  const value = err.code === "commander.unknownOption" || err.code === "commander.unknownCommand" || err.code === "commander.excessArguments" ? quoted : undefined;
  return { message: `${sentence}${hint}.`, ...(value !== undefined ? { value } : {}), code };
}

/** What an error escaping a command means for the user: its lines and the exit code. */
export function describeFailure(err: unknown): { text: string; exitCode: number } {
  const colour = useColour(process.stderr);
  if (err instanceof CommanderError) {
    if (err.code === "commander.helpDisplayed" || err.code === "commander.version" || err.code === "commander.help") return { text: "", exitCode: err.exitCode };
    const p = commanderProblem(err);
    return { text: renderDiagnostics([commandLineError(p.code, p.message, p.value, p.flags)], colour), exitCode: EXIT.badInput };
  }
  if (err instanceof StrataError) return { text: renderDiagnostics(err.diagnostics, colour), exitCode: EXIT.badInput };
  if (err instanceof PlsError) return { text: renderDiagnostics([err.diagnostic], colour), exitCode: EXIT.badInput };
  const fs = fileSystemDiagnostic(err);
  if (fs !== undefined) return { text: formatDiagnostic(fs) + "\n", exitCode: EXIT.badInput };
  const what = err instanceof Error ? err.message.split("\n")[0] : String(err);
  const debug = process.env["STRATA_DEBUG"] === "1";
  const stack = debug && err instanceof Error && err.stack !== undefined ? err.stack + "\n" : "";
  const line = `strata: internal error: ${what} (this is a bug in Strata; please report it with the command you ran${debug ? "" : "; STRATA_DEBUG=1 shows the stack"}).\n`;
  return { text: line + stack, exitCode: EXIT.internal };
}

/**
 * `--color` / `--no-color` apply to messages about the command line too, which commander reports
 * before any command runs (the last of the two wins, as in option parsing).
 */
export function colourFromArgs(args: readonly string[]): void {
  const at = Math.max(args.lastIndexOf("--color"), args.lastIndexOf("--no-color"));
  setColour(at < 0 ? undefined : args[at] === "--color");
}

/** Parses and runs; never lets a stack trace reach the user unless STRATA_DEBUG=1. */
export async function runProgram(program: Command, argv: readonly string[]): Promise<void> {
  setCommandLine(argv.slice(2));
  colourFromArgs(argv.slice(2));
  guardPipes();
  const fatal = (err: unknown): void => {
    const f = describeFailure(err);
    process.stderr.write(f.text);
    process.exit(f.exitCode);
  };
  process.on("uncaughtException", fatal);
  process.on("unhandledRejection", fatal);
  try {
    await program.parseAsync([...argv]);
  } catch (err) {
    const f = describeFailure(err);
    if (f.text !== "") process.stderr.write(f.text);
    process.exitCode = f.exitCode;
  }
}
