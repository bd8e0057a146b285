// The worker thread of a run's checks (check-written.ts): runs each job it is sent, in order, and
// sends back its result or its error. Each lexicon file's records are counted once, ahead of the
// jobs when a `count` message asks for it.

import { parentPort } from "node:worker_threads";
import { checkWritten, InputCounts, passError, type CheckJob, type CheckReply } from "./check-written.js";

const inputs = new InputCounts();
// For the tests: the worker dies at its first job, as a crash would end it.
const dieAtFirstJob = process.env["STRATA_TEST_CHECK_EXIT"] !== undefined;

let queue: Promise<void> = Promise.resolve();
parentPort!.on("message", (m: { id: number; job: CheckJob } | { count: string }) => {
  if ("count" in m) {
    void inputs.of(m.count);
    return;
  }
  if (dieAtFirstJob) process.exit(3);
  queue = queue.then(async () => {
    let reply: CheckReply;
    try {
      reply = { id: m.id, result: await checkWritten(m.job, (p) => inputs.of(p)) };
    } catch (e) {
      reply = { id: m.id, error: passError(e) };
    }
    parentPort!.postMessage(reply);
  });
});
