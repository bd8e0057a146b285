// `strata init DIR`: a new lexicon folder (varieties.json, an empty lexicon.csv with its header, a
// grammar that is a variety of a copy of a shipped one), ready for `strata build DIR`.

import { existsSync, readdirSync } from "node:fs";
import { relative } from "node:path";
import { InvalidArgumentError, Option, type Command } from "commander";
import { isWellFormedLanguageTag } from "../emit/pls.js";
import { scaffoldLexicon } from "../lexicon/scaffold.js";
import { checkOutputPath, commandLineError, commonOptions, EXIT, examples, printOutcome, renderDiagnostics, shippedGrammar, useColour, type CommandOutcome } from "./common.js";

/** The shipped grammars a new voice can start from (names as in lexicons/demo/varieties.json). */
export const INIT_BASES = { general: "grammar.strata", careful: "careful.strata" } as const;

export interface InitOptions {
  readonly from?: keyof typeof INIT_BASES;
  readonly variety?: string;
  readonly lang?: string;
  readonly quiet?: boolean;
}

export function runInit(dir: string, o: InitOptions = {}): CommandOutcome {
  const render = (ds: Parameters<typeof renderDiagnostics>[0]): string => renderDiagnostics(ds, useColour());
  const bad = checkOutputPath(dir, [], "folder") ??
    (existsSync(dir) && readdirSync(dir).length > 0 ? commandLineError("cli/not-empty", `'${dir}' already exists and is not empty; choose a new folder.`, dir) : undefined);
  if (bad !== undefined) return { stdout: "", stderr: render([bad]), exitCode: EXIT.badInput };
  const variety = o.variety ?? "general";
  const r = scaffoldLexicon(dir, { from: shippedGrammar(), base: INIT_BASES[o.from ?? "general"], variety, lang: o.lang ?? "en-US" });
  if (r.diagnostics.length > 0) return { stdout: "", stderr: render(r.diagnostics), exitCode: EXIT.badInput };
  const rel = relative(process.cwd(), dir) || ".";
  const stdout = o.quiet === true ? "" :
    `Created ${rel}/: varieties.json (variety '${variety}'), lexicon.csv (header only), grammar.strata (a variety of a copy of the shipped en-us grammar).\n` +
    `Next: add rows to ${rel}/lexicon.csv, then run 'strata build ${rel}'.\n`;
  return { stdout, stderr: "", exitCode: EXIT.ok };
}

function varietyName(value: string): string {
  if (!/^[A-Za-z0-9][A-Za-z0-9._-]*$/.test(value)) throw new InvalidArgumentError("It must be a simple folder name (letters, digits, . _ -).");
  return value;
}

function languageTag(value: string): string {
  if (!isWellFormedLanguageTag(value)) throw new InvalidArgumentError("It must be a well-formed BCP 47 language tag such as en-US.");
  return value;
}

export function registerInit(program: Command): void {
  const cmd = program
    .command("init")
    .description("start a new voice: a lexicon folder with varieties.json, an empty lexicon.csv and a grammar built on a shipped one")
    .argument("<dir>", "the folder to create (new, or empty)")
    .addOption(new Option("--from <grammar>", "the shipped en-us grammar to start from").choices(Object.keys(INIT_BASES)).default("general"))
    .option("-d, --variety <name>", "the new variety's name (its output folder)", varietyName, "general")
    .option("--lang <tag>", "the variety's BCP 47 language tag (PLS xml:lang)", languageTag, "en-US");
  commonOptions(cmd);
  examples(cmd, [
    ["strata init my-voice", "my-voice/{varieties.json, lexicon.csv, grammar.strata, en-us/}"],
    ["strata init station-names --from careful -d announcer", "start from the careful grammar"],
  ]);
  cmd.action(async (dir: string, o: InitOptions) => {
    await printOutcome(runInit(dir, o));
  });
}
