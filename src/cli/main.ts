#!/usr/bin/env node
// The `strata` command line: a thin commander layer; each command lives in its own file under cli/.

import { Command } from "commander";
import { registerClasses } from "./classes.js";
import { registerImport } from "./import.js";
import { registerBuild } from "./build.js";
import { registerTranscribe } from "./transcribe.js";
import { registerCompile } from "./compile.js";
import { registerGraph } from "./graph.js";
import { registerLint } from "./lint.js";
import { registerClusters } from "./clusters.js";
import { registerExplain } from "./explain.js";
import { registerInteractions } from "./interactions.js";

const program = new Command();
program
  .name("strata")
  .description("Compile SPE-style phonological rules into finite-state transducers and run pronunciation lexicons through them.")
  .version("0.1.0");
registerClasses(program);
registerImport(program);
registerBuild(program);
registerTranscribe(program);
registerCompile(program);
registerGraph(program);
registerLint(program);
registerClusters(program);
registerExplain(program);
registerInteractions(program);

await program.parseAsync(process.argv);
