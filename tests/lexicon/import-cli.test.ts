// Tests of `strata import --arpabet` (runImport): files written, rejects file, summary and exit codes.

import { mkdtemp, readFile, writeFile, readdir } from "node:fs/promises";
import { tmpdir } from "node:os";
import { join } from "node:path";
import { describe, expect, it } from "vitest";
import { parse } from "csv-parse/sync";
import { runImport } from "../../src/cli/import.js";

async function dictFile(lines: string[]): Promise<{ dir: string; path: string }> {
  const dir = await mkdtemp(join(tmpdir(), "strata-import-"));
  const path = join(dir, "demo.dict");
  await writeFile(path, lines.join("\n") + "\n");
  return { dir, path };
}

describe("strata import --arpabet", () => {
  it("writes the lexicon CSV and reconciles lines in its summary", async () => {
    const { dir, path } = await dictFile([";;; invented words", "QUILLHAVEN  K W IH1 L HH EY2 V AH0 N", "SALLOWMEDE  S AE1 L OW0 M IY2 D", "SALLOWMEDE(2)  S AA1 L OW0 M IY2 D", ""]);
    const out = join(dir, "demo.csv");
    const o = await runImport({ arpabet: path, out: out });
    expect(o.exitCode).toBe(0);
    expect(o.stderr).toContain("import: 5 lines read = 3 entries written + 0 rejected + 1 comment + 1 blank");
    const rows = parse(await readFile(out, "utf8")) as string[][];
    expect(rows).toEqual([
      ["word", "pron", "note"],
      ["QUILLHAVEN", "k w ˈɪ l h ˌeɪ v ə n", ""],
      ["SALLOWMEDE", "s ˈæ l oʊ m ˌi d", ""],
      ["SALLOWMEDE", "s ˈɑ l oʊ m ˌi d", ""],
    ]);
    expect(await readdir(dir)).toEqual(["demo.csv", "demo.csv.rejects.csv", "demo.csv.summary.json", "demo.dict"]);
    expect(await readFile(join(dir, "demo.csv.rejects.csv"), "utf8")).toBe("file,line,column,code,reason,raw\n");
    expect(JSON.parse(await readFile(join(dir, "demo.csv.summary.json"), "utf8"))).toEqual({ lines: 5, entries: 3, rejected: 0, comments: 1, blanks: 1, changed: { "before-vowel": 0 } });
  });

  it("writes rejects beside the output and exits 3 unless rejects are allowed", async () => {
    const { dir, path } = await dictFile(["DOVRENNY  D AA1 V R EH0 N IY0 QX0", "FENNAMERE  F EH1 N AH0 M IH2 R"]);
    const out = join(dir, "demo.csv");
    const o = await runImport({ arpabet: path, out: out });
    expect(o.exitCode).toBe(3);
    expect(o.stderr).toContain(`${path}:1:31: error: 'QX0' is not a phone of the mapping table arpabet.csv. [arpabet/unknown-phone]`);
    expect(o.stderr).toContain("--allow-rejects");
    const rejects = parse(await readFile(`${out}.rejects.csv`, "utf8")) as string[][];
    expect(rejects[1]).toEqual([path, "1", "31", "arpabet/unknown-phone", "'QX0' is not a phone of the mapping table arpabet.csv.", "DOVRENNY  D AA1 V R EH0 N IY0 QX0"]);
    expect((parse(await readFile(out, "utf8")) as string[][]).map((r) => r[0])).toEqual(["word", "FENNAMERE"]);
    const allowed = await runImport({ arpabet: path, out: out, allowRejects: true });
    expect(allowed.exitCode).toBe(0);
  });

  it("writes to standard output without -o", async () => {
    const { path } = await dictFile(["KEST  K EH1 S T"]);
    const o = await runImport({ arpabet: path });
    expect(o.stdout).toBe("word,pron,note\nKEST,k ˈɛ s t,\n");
  });

  it("exits 1 with a positioned error when the dictionary or the table cannot be read", async () => {
    const missing = await runImport({ arpabet: "/nonexistent/strata.dict" });
    expect(missing.exitCode).toBe(1);
    expect(missing.stderr).toContain("command line:1:1: error: Cannot read the dictionary '/nonexistent/strata.dict': there is no such file. [cli/no-such-file]");
    const { path } = await dictFile(["KEST  K EH1 S T"]);
    const noTable = await runImport({ arpabet: path, table: "/nonexistent/table.csv" });
    expect(noTable.exitCode).toBe(1);
    expect(noTable.stderr).toContain("Cannot read the mapping table '/nonexistent/table.csv'");
  });
});
