// The pieces of the output life cycle on their own: the staged folder swap and the clean-up after
// a run killed at each step of it, the output lock, and reconciliation from written files.

import { spawnSync } from "node:child_process";
import { existsSync, mkdirSync, mkdtempSync, readFileSync, readdirSync, renameSync, writeFileSync } from "node:fs";
import { hostname, tmpdir } from "node:os";
import { join } from "node:path";
import { describe, expect, it } from "vitest";
import { acquireLock } from "../../src/lexicon/lock.js";
import { recoverOutputs, stageFolder } from "../../src/lexicon/outdir.js";
import { countInputRecords, countWritten, csvRecords, reconcile } from "../../src/lexicon/reconcile.js";

const fresh = (): string => mkdtempSync(join(tmpdir(), "strata-outdir-"));
const files = (dir: string): Record<string, string> => Object.fromEntries(readdirSync(dir).sort().map((f) => [f, readFileSync(join(dir, f), "utf8")]));

/** The id of a process that has exited (a child run to completion). */
function deadPid(): number {
  const r = spawnSync(process.execPath, ["-e", "process.stdout.write(String(process.pid))"], { encoding: "utf8" });
  return Number(r.stdout);
}

describe("stageFolder", () => {
  it("fills a hidden staging folder and swaps it in whole; nothing else is left beside the target", async () => {
    const root = fresh();
    const target = join(root, "general");
    mkdirSync(target);
    writeFileSync(join(target, "a.txt"), "old a\n");
    writeFileSync(join(target, "b.txt"), "old b\n");
    const s = await stageFolder(target);
    expect(s.path.startsWith(join(root, ".general."))).toBe(true);
    writeFileSync(join(s.path, "a.txt"), "new a\n");
    // Until the commit the target is the old run, whole.
    expect(files(target)).toEqual({ "a.txt": "old a\n", "b.txt": "old b\n" });
    await s.commit();
    expect(files(target)).toEqual({ "a.txt": "new a\n" });
    expect(readdirSync(root)).toEqual(["general"]);
  });

  it("abort leaves the target as it was", async () => {
    const root = fresh();
    const target = join(root, "general");
    mkdirSync(target);
    writeFileSync(join(target, "a.txt"), "old\n");
    const s = await stageFolder(target);
    writeFileSync(join(s.path, "a.txt"), "new\n");
    await s.abort();
    expect(files(target)).toEqual({ "a.txt": "old\n" });
    expect(readdirSync(root)).toEqual(["general"]);
  });
});

describe("recoverOutputs after a run killed at each step of the swap", () => {
  /** The folder as a run with process id `pid` leaves it after `steps` steps of its swap. */
  function killedAt(steps: number, pid: number): string {
    const root = fresh();
    mkdirSync(join(root, "general"));
    writeFileSync(join(root, "general", "f.txt"), "old\n");
    const staging = join(root, `.general.${pid}.0123456789ab.staging`);
    mkdirSync(staging);
    writeFileSync(join(staging, "f.txt"), "new\n");
    writeFileSync(join(staging, `.f.txt.${pid}.0123456789ac.tmp`), "half");
    writeFileSync(join(root, `.run.json.${pid}.0123456789ad.tmp`), "half");
    if (steps >= 1) renameSync(join(root, "general"), join(root, `.general.${pid}.0123456789ae.old`));
    if (steps >= 2) renameSync(staging, join(root, "general"));
    return root;
  }

  it("before the swap: the old folder stays, the staging folder and temporaries go", () => {
    const root = killedAt(0, deadPid());
    const r = recoverOutputs(root);
    expect(r.restored).toEqual([]);
    expect(readdirSync(root)).toEqual(["general"]);
    expect(files(join(root, "general"))).toEqual({ "f.txt": "old\n" });
  });

  it("between the two renames: the old folder is put back whole", () => {
    const root = killedAt(1, deadPid());
    expect(existsSync(join(root, "general"))).toBe(false);
    const r = recoverOutputs(root);
    expect(r.restored).toEqual(["general"]);
    expect(readdirSync(root)).toEqual(["general"]);
    expect(files(join(root, "general"))).toEqual({ "f.txt": "old\n" });
  });

  it("after the swap: the new folder stays, the old one goes", () => {
    const root = killedAt(2, deadPid());
    recoverOutputs(root);
    expect(readdirSync(root)).toEqual(["general"]);
    expect(Object.keys(files(join(root, "general")))).toContain("f.txt");
    expect(readFileSync(join(root, "general", "f.txt"), "utf8")).toBe("new\n");
  });

  it("leaves a live process's temporaries alone", () => {
    const root = killedAt(1, process.pid);
    const r = recoverOutputs(root);
    expect(r).toEqual({ restored: [], removed: [] });
    expect(readdirSync(root).length).toBe(3);
  });
});

describe("acquireLock", () => {
  it("one holder at a time; released only by its holder; a dead holder's lock is taken over", () => {
    const dir = fresh();
    const a = acquireLock(dir, "/lexicons/a");
    expect(a.ok).toBe(true);
    const b = acquireLock(dir, "/lexicons/b");
    expect(b).toMatchObject({ ok: false, holder: { pid: process.pid, source: "/lexicons/a" } });
    if (a.ok) a.release();
    expect(readdirSync(dir)).toEqual([]);
    writeFileSync(join(dir, ".lock"), JSON.stringify({ pid: deadPid(), host: hostname(), source: "/x", started: "", token: "old" }));
    const c = acquireLock(dir, "/lexicons/c");
    expect(c.ok).toBe(true);
    expect(JSON.parse(readFileSync(join(dir, ".lock"), "utf8"))).toMatchObject({ pid: process.pid, source: "/lexicons/c" });
    // A stale holder's release (by token) never removes the new holder's lock.
    expect(readdirSync(dir)).toEqual([".lock"]);
    if (c.ok) c.release();
    expect(readdirSync(dir)).toEqual([]);
  });

  it("a lock file it cannot read is never deleted, and refuses", () => {
    const dir = fresh();
    writeFileSync(join(dir, ".lock"), "something else");
    expect(acquireLock(dir, "/x").ok).toBe(false);
    expect(readFileSync(join(dir, ".lock"), "utf8")).toBe("something else");
  });
});

describe("reconciliation", () => {
  it("counts records by the lexicon format: CR LF, LF and a lone CR end lines; a lone CR inside quotes is data; comments, blanks and the header are not records", async () => {
    const dir = fresh();
    const p = join(dir, "l.csv");
    writeFileSync(p, "\ufeff# comment, \"quoted\r\nWord,pron\r\n\r\nkettle,x\r\n\"pin\rwheel\",y\n \t\ncat,z");
    expect(await countInputRecords(p)).toEqual({ count: 3, lines: [4, 5, 8], words: ["kettle", "pin\rwheel", "cat"] });
    // CR-only line ends; "row CR CR LF" is a row and then a blank line.
    writeFileSync(p, "word,pron\rkettle,x\rcat,y\r\r\nowl,z\r");
    expect(await countInputRecords(p)).toEqual({ count: 3, lines: [2, 3, 5], words: ["kettle", "cat", "owl"] });
    // A quote left open ends at the LF: one broken record, never the rest of the file.
    writeFileSync(p, "word,pron\n\"broken,x\nowl,z\n");
    expect(await countInputRecords(p)).toEqual({ count: 2, lines: [2, 3], words: ["broken,x", "owl"] });
  });

  it("csvRecords follows RFC 4180 §2 quoting (quotes doubled, line breaks inside quotes)", () => {
    expect(csvRecords('a,"b ""q"", c"\r\n"x\ny",z\nlast')).toEqual([["a", 'b "q", c'], ["x\ny", "z"], ["last"]]);
  });

  it("finds a dropped row and a doubled row even when the counts come out even", async () => {
    const dir = fresh();
    const w = (name: string, text: string): string => {
      writeFileSync(join(dir, name), text);
      return join(dir, name);
    };
    const lex = w("lexicon.csv", "word,pron\nkettle,a\npinwheel,b\ntundra,c\ncat,d\n");
    const input = await countInputRecords(lex);
    const jsonl = (word: string, line: number): string => JSON.stringify({ word, narrow: "", broad: "", variants: [], rules: [], source: { file: "lexicon.csv", line } }) + "\n";
    const ok = await countWritten({
      tsv: w("ok.tsv", "word\tnarrow\tbroad\nkettle\ta\ta\ntundra\tc\tc\ncat\td\td\n"),
      jsonl: w("ok.jsonl", jsonl("kettle", 2) + jsonl("tundra", 4) + jsonl("cat", 5)),
      rejects: w("ok-rejects.csv", "file,line,column,code,reason,raw\nlexicon.csv,3,1,x,\"why, indeed\",\"pinwheel,b\"\n"),
    });
    expect(reconcile(lex, input, ok)).toEqual([]);
    // tundra written twice under two lines, cat lost: 3 entries + 1 reject, as many as records.
    const shifted = await countWritten({
      tsv: w("bad.tsv", "word\tnarrow\tbroad\nkettle\ta\ta\ntundra\tc\tc\ntundra\tc\tc\n"),
      jsonl: w("bad.jsonl", jsonl("kettle", 2) + jsonl("tundra", 4) + jsonl("tundra", 5)),
      rejects: w("ok-rejects.csv", "file,line,column,code,reason,raw\nlexicon.csv,3,1,x,y,z\n"),
    });
    const errs = reconcile(lex, input, shifted);
    expect(errs.map((d) => [d.code, d.line])).toEqual([["run/unreconciled", 5]]);
    expect(errs[0]!.message).toContain("line 5");
    // A row in neither file, and one in both.
    const lost = await countWritten({
      jsonl: w("lost.jsonl", jsonl("kettle", 2) + jsonl("pinwheel", 3)),
      rejects: w("lost-rejects.csv", "file,line,column,code,reason,raw\nlexicon.csv,3,1,x,y,z\nlexicon.csv,4,1,x,y,z\n"),
    });
    const msgs = reconcile(lex, input, lost).map((d) => d.message);
    expect(msgs.some((m) => m.includes("Line 5 of the lexicon is neither an entry nor a reject."))).toBe(true);
    expect(msgs.some((m) => m.includes("Line 3 of the lexicon was written more than once."))).toBe(true);
  });
});
