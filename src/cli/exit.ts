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

export { plural } from "../counts.js";
