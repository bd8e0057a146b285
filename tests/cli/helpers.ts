// Running the command line in-process: the real program (createProgram + the commands' register
// functions), the arguments as a user types them, standard output, standard error and the exit code
// captured as the binary would produce them (commander's errors rendered by describeFailure).

import { vi } from "vitest";
import type { Command } from "commander";
import { colourFromArgs, createProgram, describeFailure } from "../../src/cli/program.js";
import { setCommandLine } from "../../src/cli/cmdline.js";
import { setColour } from "../../src/cli/output.js";
import { registerBuild } from "../../src/cli/build.js";
import { registerClasses } from "../../src/cli/classes.js";
import { registerClusters } from "../../src/cli/clusters.js";
import { registerCompile } from "../../src/cli/compile.js";
import { registerGraph } from "../../src/cli/graph.js";
import { registerImport } from "../../src/cli/import.js";
import { registerInit } from "../../src/cli/init.js";
import { registerLint } from "../../src/cli/lint.js";
import { registerTranscribe } from "../../src/cli/transcribe.js";
import { registerExplain } from "../../src/cli/explain.js";
import { registerInteractions } from "../../src/cli/interactions.js";
import { registerVarieties } from "../../src/cli/varieties.js";

/** The program with every command of main.ts. */
export function program(): Command {
  const p = createProgram();
  for (const register of [registerInit, registerClasses, registerImport, registerBuild, registerTranscribe, registerCompile, registerGraph, registerLint, registerClusters, registerExplain, registerInteractions, registerVarieties]) register(p);
  return p;
}

export interface CliRun {
  readonly stdout: string;
  readonly stderr: string;
  readonly exitCode: number;
}

/** Runs `strata ARGS` in this process. */
export async function cli(args: readonly string[]): Promise<CliRun> {
  let stdout = "";
  let stderr = "";
  // Commands write text or UTF-8 byte chunks (emit/buffered.ts); bytes are decoded as a stream.
  const outBytes = new TextDecoder();
  const errBytes = new TextDecoder();
  const text = (d: TextDecoder, c: string | Uint8Array): string => (typeof c === "string" ? c : d.decode(c, { stream: true }));
  const out = vi.spyOn(process.stdout, "write").mockImplementation((c: string | Uint8Array) => ((stdout += text(outBytes, c)), true));
  const err = vi.spyOn(process.stderr, "write").mockImplementation((c: string | Uint8Array) => ((stderr += text(errBytes, c)), true));
  const before = process.exitCode;
  process.exitCode = undefined;
  setCommandLine(args);
  colourFromArgs(args);
  let exitCode = 0;
  try {
    await program().parseAsync(["node", "strata", ...args]);
    exitCode = typeof process.exitCode === "number" ? process.exitCode : 0;
  } catch (e) {
    const f = describeFailure(e);
    stderr += f.text;
    exitCode = f.exitCode;
  } finally {
    out.mockRestore();
    err.mockRestore();
    process.exitCode = before;
    setCommandLine([]);
    setColour(undefined);
  }
  return { stdout, stderr, exitCode };
}
