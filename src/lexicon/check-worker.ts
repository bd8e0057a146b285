// The worker thread of a run's checks (check-written.ts): runs each job it is sent, in order, and
// sends back its result or its error. Each lexicon file's records are counted once, ahead of the
// jobs when a `count` message asks for it. Files being written are read as they grow
// (`FollowedFiles`), and their jobs take the read-back from there.

import { parentPort } from "node:worker_threads";
import { checkWritten, FollowedFiles, InputCounts, passError, type CheckJob, type CheckReply, type FollowMessage } from "./check-written.js";
import type { JsonlBack, TsvBack } from "./readback.js";

function loseLine(back: TsvBack | JsonlBack): TsvBack | JsonlBack {
  if ("entries" in back) return { ...back, entries: back.entries - 1 };
  return { count: back.count - 1, lines: back.lines.slice(0, -1), files: back.files.slice(0, -1), words: back.words.slice(0, -1) };
}

const inputs = new InputCounts();
// For the tests: each followed file's read-back loses a line, so that a build shows its check used it.
const followed = new FollowedFiles(process.env["STRATA_TEST_FOLLOW_LOSES_LINE"] !== undefined ? loseLine : undefined);
// For the tests: the worker dies at its first job, as a crash would end it.
const dieAtFirstJob = process.env["STRATA_TEST_CHECK_EXIT"] !== undefined;

let queue: Promise<void> = Promise.resolve();
parentPort!.on("message", (m: { id: number; job: CheckJob } | { count: string } | FollowMessage) => {
  if ("count" in m) {
    void inputs.of(m.count);
    return;
  }
  if ("follow" in m || "grown" in m || "drop" in m) {
    followed.take(m);
    return;
  }
  if (dieAtFirstJob) process.exit(3);
  queue = queue.then(async () => {
    let reply: CheckReply;
    try {
      reply = { id: m.id, result: await checkWritten(m.job, (p) => inputs.of(p), followed) };
    } catch (e) {
      reply = { id: m.id, error: passError(e) };
    }
    parentPort!.postMessage(reply);
  });
});
