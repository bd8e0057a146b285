// The worker thread of a run's checks (check-written.ts): runs each job it is sent, in order, and
// sends back its result or its error. Each lexicon file's records are counted once.

import { parentPort } from "node:worker_threads";
import { checkWritten, passError, type CheckJob, type CheckReply } from "./check-written.js";
import { countInputRecords, type InputRecords } from "./reconcile.js";

const inputs = new Map<string, Promise<InputRecords>>();
const inputOf = (path: string): Promise<InputRecords> => {
  let p = inputs.get(path);
  if (p === undefined) inputs.set(path, (p = countInputRecords(path)));
  return p;
};
// For the tests: the worker dies at its first job, as a crash would end it.
const dieAtFirstJob = process.env["STRATA_TEST_CHECK_EXIT"] !== undefined;

let queue: Promise<void> = Promise.resolve();
parentPort!.on("message", (m: { id: number; job: CheckJob }) => {
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
