// The worker thread of a run's checks (check-written.ts): runs each job it is sent, in order, and
// sends back its result or its error. Each lexicon file's records are counted once, ahead of the
// jobs when a `count` message asks for it.

import { parentPort } from "node:worker_threads";
import { checkWritten, passError, type CheckJob, type CheckReply } from "./check-written.js";
import { countInputRecords, type InputRecords } from "./reconcile.js";

const inputs = new Map<string, Promise<InputRecords>>();
const inputOf = (path: string): Promise<InputRecords> => {
  let p = inputs.get(path);
  if (p === undefined) {
    inputs.set(path, (p = countInputRecords(path)));
    // Counted ahead (a `count` message): a failure is the first job's to report.
    p.catch(() => undefined);
  }
  return p;
};
// For the tests: the worker dies at its first job, as a crash would end it.
const dieAtFirstJob = process.env["STRATA_TEST_CHECK_EXIT"] !== undefined;

let queue: Promise<void> = Promise.resolve();
parentPort!.on("message", (m: { id: number; job: CheckJob } | { count: string }) => {
  if ("count" in m) {
    void inputOf(m.count);
    return;
  }
  if (dieAtFirstJob) process.exit(3);
  queue = queue.then(async () => {
    let reply: CheckReply;
    try {
      reply = { id: m.id, result: await checkWritten(m.job, inputOf) };
    } catch (e) {
      reply = { id: m.id, error: passError(e) };
    }
    parentPort!.postMessage(reply);
  });
});
