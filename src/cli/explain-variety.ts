// `strata compile -g … --explain-variety`: the resolved step list of a grammar (a variety and its
// chain of bases) with where each step came from, as a table or JSON. Nothing is compiled.

import stringWidth from "string-width";
import { hasErrors } from "../diagnostics.js";
import { loadGrammar } from "../grammar/index.js";
import { explainVariety, varietyReport } from "../grammar/explain-variety.js";
import { EXIT, renderDiagnostics, resolveGrammar, useColour, type CommandOutcome } from "./common.js";

export interface ExplainVarietyOptions {
  readonly variety?: string;
  readonly root?: string;
  readonly json?: boolean;
  readonly quiet?: boolean;
}

/** Loads the grammar `-g`/`-d` name (never from the cache: the origins are not kept there) and explains it. */
export function runExplainVariety(g: string | undefined, opts: ExplainVarietyOptions = {}): CommandOutcome {
  const r = resolveGrammar(g, opts.variety);
  if ("diagnostics" in r) return { stdout: "", stderr: renderDiagnostics(r.diagnostics, useColour()), exitCode: EXIT.badInput };
  const loaded = loadGrammar(r.path, opts.root !== undefined ? { root: opts.root } : {});
  const shown = loaded.diagnostics.filter((d) => d.severity === "error" || opts.quiet !== true);
  const stderr = renderDiagnostics(shown, useColour());
  if (loaded.grammar === undefined || loaded.variety === undefined || hasErrors(loaded.diagnostics)) return { stdout: "", stderr, exitCode: EXIT.badInput };
  const e = explainVariety(loaded.grammar, loaded.variety);
  const stdout = opts.json === true ? JSON.stringify(e, null, 2) + "\n" : varietyReport(e, stringWidth);
  return { stdout, stderr, exitCode: EXIT.ok };
}
