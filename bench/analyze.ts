// Bench section: the exact interaction analysis of the shipped en-us grammar (every ordered pair
// of its steps), cold, in this process on one core; the figure, its phases and the largest
// intermediate machine. The check is on the output (every pair decided), never on the time.

import { loadGrammar } from "../src/grammar/index.js";
import { analyseInteractions, RELATIONS } from "../src/analyze/interactions.js";

export function benchAnalyze(): boolean {
  console.log("## analyze: interactions of lexicons/en-us/grammar.strata (cold, one core)");
  const g = loadGrammar("lexicons/en-us/grammar.strata");
  if (g.grammar === undefined || g.inventory === undefined) {
    console.log("the grammar did not load");
    return false;
  }
  const t0 = performance.now();
  const { report } = analyseInteractions(g.grammar, g.inventory);
  const seconds = (performance.now() - t0) / 1000;
  if (report === null) {
    console.log("the analysis did not run");
    return false;
  }
  const n = report.steps.length;
  let found = 0, undecided = 0;
  for (const p of report.pairs) for (const k of RELATIONS) { const d = p.relations[k]; if (!d.decided) undecided++; else if (d.value !== null) found++; }
  for (const s of report.swaps) if (!s.difference.decided) undecided++;
  console.log(`steps ${n}, ordered pairs ${report.pairs.length}, relations found ${found}, not decided ${undecided}`);
  console.log(`total ${seconds.toFixed(2)} s (target ≤ 10 s: ${seconds <= 10 ? "met" : "not met"})`);
  console.log(`phases: ${Object.entries(report.phases).map(([k, v]) => `${k} ${v.toFixed(2)} s`).join(", ")}`);
  console.log(`largest machine: ${report.largest.states} states (${report.largest.what})`);
  return undecided === 0 && found > 0;
}
