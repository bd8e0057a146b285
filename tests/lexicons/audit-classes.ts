// Classes of disagreement between a phonetician's narrow transcription and the grammar's: each
// class names one phenomenon (a mark or a letter of the narrow IPA), so the audit can say which
// rule family an error belongs to (tests/lexicons/audit.test.ts, tests/fixtures/audit/README.md).

/** One written segment: its base letter(s) with the marks that follow it. */
interface Unit {
  readonly base: string;
  readonly marks: string;
  /** The prosodic mark written before it: "" (none), ".", "ˈ" or "ˌ". */
  readonly before: string;
}

const COMBINING = /[\u0300-\u036f]/u;
const MODIFIERS = new Set(["ʰ", "ː", "ʷ", "ˠ"]);
const PROSODY = new Set([".", "ˈ", "ˌ"]);

/** Splits narrow IPA into units; a diphthong's two letters are two units (both sides split alike). */
export function units(ipa: string): Unit[] {
  const out: { base: string; marks: string; before: string }[] = [];
  let pending = "";
  for (const ch of ipa.normalize("NFD")) {
    if (PROSODY.has(ch)) pending = ch;
    else if (COMBINING.test(ch) || MODIFIERS.has(ch)) {
      const last = out[out.length - 1];
      if (last !== undefined) last.marks += ch;
    } else {
      // a word starts a syllable: its first unit counts as after a boundary
      out.push({ base: ch, marks: "", before: pending === "" && out.length === 0 ? "." : pending });
      pending = "";
    }
  }
  return out;
}

/** The letter a unit stands for once the allophonic choices of /t d l/ are undone. */
const skeleton = (u: Unit): string => (u.base === "ɾ" || u.base === "ʔ" ? "T" : u.base === "t" || u.base === "d" ? "T" : u.base === "ɫ" ? "l" : u.base);

const has = (u: Unit, mark: string): boolean => u.marks.includes(mark);

/** The classes in which `actual` differs from `expected` (empty when they are the same string). */
export function classify(expected: string, actual: string): string[] {
  if (expected.normalize("NFC") === actual.normalize("NFC")) return [];
  const e = units(expected);
  const a = units(actual);
  if (e.length !== a.length || e.some((u, i) => skeleton(u) !== skeleton(a[i]!))) return ["segments"];
  const found = new Set<string>();
  e.forEach((x, i) => {
    const y = a[i]!;
    const flap = (u: Unit) => u.base === "ɾ" && !has(u, "\u0303");
    const nasalFlap = (u: Unit) => u.base === "ɾ" && has(u, "\u0303");
    if (flap(x) !== flap(y)) found.add("flapping");
    if (nasalFlap(x) !== nasalFlap(y)) found.add("nasal flap");
    if ((x.base === "ʔ") !== (y.base === "ʔ")) found.add("glottal stop");
    if ((x.base === "t") !== (y.base === "t") && x.base !== "ɾ" && y.base !== "ɾ" && x.base !== "ʔ" && y.base !== "ʔ") found.add("segments");
    if ((x.base === "ɫ") !== (y.base === "ɫ")) found.add("dark l");
    if (has(x, "ʰ") !== has(y, "ʰ")) found.add("aspiration");
    if (has(x, "ː") !== has(y, "ː")) found.add("length");
    if (x.base !== "ɾ" && has(x, "\u0303") !== has(y, "\u0303")) found.add("nasalisation");
    if ((has(x, "\u0325") || has(x, "\u030a")) !== (has(y, "\u0325") || has(y, "\u030a"))) found.add("devoicing");
    if ((has(x, "\u0329") || has(x, "\u030d")) !== (has(y, "\u0329") || has(y, "\u030d"))) found.add("syllabic consonant");
    if (has(x, "\u032a") !== has(y, "\u032a")) found.add("dental");
    if ((x.before === "") !== (y.before === "")) found.add("syllabification");
    else if (x.before !== y.before && (x.before !== "." || y.before !== ".")) found.add("stress");
  });
  if (found.size === 0) found.add("other marks");
  return [...found].sort();
}

/** Edit distance over code points (NFD), the tie-breaker between equally classed alternatives. */
function distance(a: string, b: string): number {
  const x = [...a.normalize("NFD")];
  const y = [...b.normalize("NFD")];
  let row = y.map((_, j) => j + 1);
  x.forEach((cx, i) => {
    const next = [i + 1];
    y.forEach((cy, j) => next.push(Math.min(row[j]! + 1, next[j]! + 1, (j === 0 ? i : row[j - 1]!) + (cx === cy ? 0 : 1))));
    row = next.slice(1);
  });
  return y.length === 0 ? x.length : row[y.length - 1]!;
}

/** The alternative (of `expected`, split on "|") closest to `actual`: fewest classes, then fewest edits. */
export function closest(expected: readonly string[], actual: string): { form: string; classes: string[] } {
  const scored = expected.map((form) => ({ form, classes: classify(form, actual), edits: distance(form, actual) }));
  scored.sort((a, b) => a.classes.length - b.classes.length || a.edits - b.edits);
  return { form: scored[0]!.form, classes: scored[0]!.classes };
}
