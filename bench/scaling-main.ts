// `node dist/bench/scaling-main.js`: the grammar-size scaling section of the bench alone.
import { benchScaling } from "./scaling.js";
import { packageRootFrom } from "./cmu.js";

const r = await benchScaling(packageRootFrom(import.meta.url), (s = "") => void process.stdout.write(s + "\n"));
process.exitCode = r.ok ? 0 : 1;
