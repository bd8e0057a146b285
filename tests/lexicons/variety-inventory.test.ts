// The inventories of the Canadian and non-rhotic varieties (lexicons/en-ca/segments.csv,
// lexicons/en-us-nonrhotic/segments.csv): the General American rows copied unchanged, and the new
// segments checked against PHOIBLE 2.0 (Moran & McCloy 2019, CC BY 4.0; rows in tests/fixtures).

import { readFileSync } from "node:fs";
import { join } from "node:path";
import { fileURLToPath } from "node:url";
import { parse } from "csv-parse/sync";
import { describe, expect, test } from "vitest";

const ROOT = fileURLToPath(new URL("../../", import.meta.url));
type Row = Record<string, string>;
const csv = (path: string): Row[] => parse(readFileSync(join(ROOT, path), "utf8"), { columns: true, comment: "#", skip_empty_lines: true, bom: true }) as Row[];

const GA = csv("lexicons/en-us/segments.csv");
const PHOIBLE = new Map(csv("tests/fixtures/reference-phoible-ga.csv").map((r) => [r["Name"]!.normalize("NFC"), r]));
/** Our feature name → PHOIBLE's column: the same Hayes-style names in camelCase; voice is [periodic glottal source]. */
const phoibleColumn = (f: string): string => (f === "voice" ? "periodicGlottalSource" : f.replace(/_(\w)/g, (_, c: string) => c.toUpperCase()));

/**
 * Per new segment: the PHOIBLE row it is compared with and the features where it differs on purpose
 * (the reasons are in the inventory files' headers: a diphthong is its nucleus + [+diphthong], as the
 * base's are; ʌʊ rounds like aʊ; ɜ is ə + [+tense] as ɝ is ɚ + [+tense]).
 */
const NEW: Record<string, { file: string; standIn: string; differs: Record<string, string> }> = {
  ʌɪ: { file: "lexicons/en-ca/segments.csv", standIn: "ʌ", differs: { diphthong: "+" } },
  ʌʊ: { file: "lexicons/en-ca/segments.csv", standIn: "ʌ", differs: { diphthong: "+", round: "+", labiodental: "-" } },
  a: { file: "lexicons/en-us-nonrhotic/segments.csv", standIn: "a", differs: {} },
  ɜ: { file: "lexicons/en-us-nonrhotic/segments.csv", standIn: "ə", differs: { tense: "+" } },
  ɪə: { file: "lexicons/en-us-nonrhotic/segments.csv", standIn: "ɪ", differs: { diphthong: "+" } },
  ɛə: { file: "lexicons/en-us-nonrhotic/segments.csv", standIn: "ɛ", differs: { diphthong: "+" } },
  ʊə: { file: "lexicons/en-us-nonrhotic/segments.csv", standIn: "ʊ", differs: { diphthong: "+" } },
};

describe.each(["lexicons/en-ca/segments.csv", "lexicons/en-us-nonrhotic/segments.csv"])("%s", (file) => {
  const rows = csv(file);
  test("holds every General American row unchanged, in order, then only its new segments", () => {
    expect(rows.slice(0, GA.length)).toEqual(GA);
    expect(rows.slice(GA.length).map((r) => r["symbol"]).sort()).toEqual(Object.keys(NEW).filter((s) => NEW[s]!.file === file).sort());
  });
  test("its new segments agree with PHOIBLE 2.0 except the listed deliberate differences", () => {
    for (const row of rows.slice(GA.length)) {
      const spec = NEW[row["symbol"]!]!;
      const ref = PHOIBLE.get(spec.standIn)!;
      expect(ref, spec.standIn).toBeDefined();
      const found: Record<string, string> = {};
      for (const feature of Object.keys(row).filter((f) => f !== "symbol")) {
        // diphthong (ours) and tap exist in only one table, or are '-' for every vowel: [diphthong] is
        // compared with '-' (a PHOIBLE monophthong row), tap with PHOIBLE's own column
        const theirs = feature === "diphthong" ? "-" : ref[phoibleColumn(feature)];
        expect(theirs, `${row["symbol"]} ${feature}`).toBeDefined();
        if (row[feature] !== theirs) found[feature] = row[feature]!;
      }
      expect(found, row["symbol"]).toEqual(spec.differs);
    }
  });
});
