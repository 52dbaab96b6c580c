/**
 * The exit-code contract of every command (docs/vocabulary.md, README "Reliability").
 * One table so the CLI, the tests and the docs cannot disagree.
 */
export const EXIT = {
  /** the command did what was asked */
  ok: 0,
  /** bad input or environment: a flag, config, data file or output path the tool cannot use */
  input: 2,
  /** a run that failed: no convergence, a diverged or collapsed training run */
  runFailed: 3,
  /** a bug: one line says so, with the command to reproduce and --debug for the trace */
  internal: 4,
  /** stopped by SIGINT (Ctrl-C) after saving */
  sigint: 130,
  /** stopped by SIGTERM after saving */
  sigterm: 143,
} as const;

export type ExitCode = (typeof EXIT)[keyof typeof EXIT];
