// The exit codes every command uses (the table in README.md and DEVELOPERS.md), and the shape of
// what a command run produces when it is run in-process (tests read it; the CLI prints it).

export const EXIT = {
  /** Success. */
  ok: 0,
  /** Bad input: a file, a grammar, a manifest or an option that cannot be used; nothing was written. */
  badInput: 1,
  /** Finished, but some input rows were rejected (`--allow-rejects` makes it 0). */
  rejects: 3,
  /** Checks failed: unexpected changes, failed expectations, findings under `--strict`. */
  checksFailed: 4,
  /** Internal error (a bug in Strata). */
  internal: 70,
} as const;

/** What a command run produced. */
export interface CommandOutcome {
  readonly stdout: string;
  readonly stderr: string;
  readonly exitCode: number;
}

/** "1 row", "2 rows", "0 rows"; `many` for irregular plurals ("1 entry", "2 entries"). */
export function plural(n: number, one: string, many = `${one}s`): string {
  return `${grouped(n)} ${n === 1 ? one : many}`;
}

/**
 * A count with commas between groups of three digits, as `toLocaleString("en-US")` writes it;
 * whole numbers without it (its first call loads the locale data: tens of milliseconds).
 */
function grouped(n: number): string {
  if (!Number.isSafeInteger(n)) return n.toLocaleString("en-US");
  const digits = String(Math.abs(n)).replace(/\B(?=(\d{3})+$)/g, ",");
  return n < 0 ? `-${digits}` : digits;
}
