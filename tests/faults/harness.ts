/**
 * The fault-injection harness: a case is a command line, the exit code it must give, a
 * fragment of the message it must print, and (always) the check that every file that existed
 * before the run is byte-for-byte the same afterwards, unless the case names it as one the run
 * may replace. Cases run in this process through runCli (no node start-up per case); each gets
 * a fresh sandbox folder. No case may print a stack trace.
 */
import { existsSync, lstatSync, mkdirSync, mkdtempSync, readdirSync, readFileSync, readlinkSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join, relative } from 'node:path';
import { runCli } from '../../src/cli/run-cli.js';
import type { CliResult } from '../../src/cli/run-cli.js';
import { resetStop } from '../../src/runtime/stop.js';

export interface Sandbox {
  dir: string;
  path(name: string): string;
  write(name: string, text: string | Uint8Array): string;
  json(name: string, value: unknown): string;
  mkdir(name: string): string;
}

export interface FaultCase {
  group: string;
  name: string;
  setup?: (s: Sandbox) => void | Promise<void>;
  argv: (s: Sandbox) => string[];
  /** expected exit code */
  code: number;
  /** a fragment of stderr (bad input, failed run) */
  message?: RegExp;
  /** sandbox paths the run may change (all others must be untouched) */
  mayChange?: string[];
  /** for exit 0: the answer is right (against an outside source or an independent computation) */
  check?: (r: CliResult, s: Sandbox) => void | Promise<void>;
}

export type Outcome = 'clear error' | 'correct answer' | 'wrong';

export function sandbox(): Sandbox {
  const dir = mkdtempSync(join(tmpdir(), 'mesofield-fault-'));
  const path = (n: string) => join(dir, n);
  return {
    dir,
    path,
    write: (n, t) => {
      writeFileSync(path(n), t);
      return path(n);
    },
    json: (n, v) => {
      writeFileSync(path(n), JSON.stringify(v, null, 1));
      return path(n);
    },
    mkdir: (n) => {
      mkdirSync(path(n), { recursive: true });
      return path(n);
    },
  };
}

/** Every file (and link) under dir with its bytes (a link: its target). */
export function snapshot(dir: string): Map<string, Buffer> {
  const out = new Map<string, Buffer>();
  const walk = (d: string) => {
    for (const e of readdirSync(d, { withFileTypes: true })) {
      const p = join(d, e.name);
      const rel = relative(dir, p);
      if (e.isSymbolicLink()) out.set(rel, Buffer.from(`-> ${readlinkSync(p)}`));
      else if (e.isDirectory()) walk(p);
      else out.set(rel, readFileSync(p));
    }
  };
  if (existsSync(dir)) walk(dir);
  return out;
}

const STACK = /\n\s+at .+:\d+:\d+/;

/** Run one case; returns the problems found (empty: the case passed) and how it ended. */
export async function runCase(c: FaultCase): Promise<{ problems: string[]; outcome: Outcome; result: CliResult }> {
  const s = sandbox();
  await c.setup?.(s);
  const before = snapshot(s.dir);
  resetStop();
  const result = await runCli(c.argv(s), { capture: true });
  resetStop();
  const problems: string[] = [];
  if (result.code !== c.code) problems.push(`exit ${result.code}, expected ${c.code}; stderr: ${result.stderr.slice(0, 600)}`);
  if (STACK.test(result.stderr)) problems.push(`a stack trace reached the user: ${result.stderr.slice(0, 400)}`);
  if (c.message && !c.message.test(result.stderr)) problems.push(`stderr does not match ${c.message}: ${result.stderr.slice(0, 600)}`);
  const after = snapshot(s.dir);
  for (const [rel, bytes] of before) {
    if (c.mayChange?.some((m) => rel === m || rel.startsWith(`${m}/`))) continue;
    const now = after.get(rel);
    if (!now) problems.push(`${rel} was deleted`);
    else if (!now.equals(bytes)) problems.push(`${rel} was changed`);
  }
  // No lock may outlive its run.
  for (const rel of after.keys()) if (rel.endsWith('.mesofield-lock') && !before.has(rel)) problems.push(`${rel} was left behind`);
  if (c.check && problems.length === 0) {
    try {
      await c.check(result, s);
    } catch (e) {
      problems.push(`wrong answer: ${(e as Error).message}`);
    }
  }
  const outcome: Outcome = problems.length > 0 ? 'wrong' : c.code === 0 ? 'correct answer' : 'clear error';
  return { problems, outcome, result };
}

/** Is `p` a directory (not following links)? */
export function isDir(p: string): boolean {
  return existsSync(p) && lstatSync(p).isDirectory();
}
