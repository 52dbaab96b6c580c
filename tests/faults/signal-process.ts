/**
 * A CLI run in a process of its own that a test can watch (stderr so far, wait for a line)
 * and signal: the signal tests' harness.
 */
import { spawn } from 'node:child_process';
import { CLI } from '../helpers/run-cli.js';

export interface Proc {
  code: Promise<{ code: number | null; signal: NodeJS.Signals | null }>;
  stderr: () => string;
  kill: (s: NodeJS.Signals) => void;
  waitFor: (re: RegExp, ms: number) => Promise<void>;
  /** Send `sig` as soon as stderr matches `re` (from the data event, not a poll: a short stretch of work is not missed). */
  killOn: (re: RegExp, sig: NodeJS.Signals) => void;
}

/**
 * `everyLine`: the run writes a progress line at every update instead of one a second
 * (src/cli/progress.ts's test hook), so a signal sent on "step k" lands at step k, not
 * wherever the next throttled line happens to fall: the run then need only be a little longer than k.
 */
export function start(args: string[], opts: { everyLine?: boolean } = {}): Proc {
  const env = opts.everyLine ? { ...process.env, MESOFIELD_TEST_PROGRESS_MS: '0' } : process.env;
  const child = spawn(process.execPath, [CLI, ...args], { stdio: ['ignore', 'pipe', 'pipe'], env });
  let err = '';
  let trigger: { re: RegExp; sig: NodeJS.Signals } | null = null;
  child.stderr.on('data', (d) => {
    err += String(d);
    if (trigger && trigger.re.test(err)) {
      child.kill(trigger.sig);
      trigger = null;
    }
  });
  child.stdout.resume();
  const code = new Promise<{ code: number | null; signal: NodeJS.Signals | null }>((resolve) => child.on('close', (c, s) => resolve({ code: c, signal: s })));
  return {
    code,
    stderr: () => err,
    kill: (s) => child.kill(s),
    killOn: (re, sig) => {
      if (re.test(err)) child.kill(sig);
      else trigger = { re, sig };
    },
    waitFor: async (re, ms) => {
      const t0 = Date.now();
      while (!re.test(err)) {
        if (Date.now() - t0 > ms) throw new Error(`timed out waiting for ${re}; stderr so far:\n${err}`);
        if (child.exitCode !== null) throw new Error(`exited ${child.exitCode} before ${re}; stderr:\n${err}`);
        await new Promise((r) => setTimeout(r, 100));
      }
    },
  };
}

/** Start `args`, wait for a stderr line matching `at`, send `sig`, and wait for the exit: what most signal cases do. */
export async function stopAt(args: string[], at: RegExp, sig: NodeJS.Signals, ms = 120_000, opts: { everyLine?: boolean } = {}): Promise<{ p: Proc; r: { code: number | null; signal: NodeJS.Signals | null } }> {
  const p = start(args, opts);
  p.killOn(at, sig);
  await p.waitFor(at, ms);
  return { p, r: await p.code };
}
