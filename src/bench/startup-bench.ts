/**
 * Start-up of the command line: whole processes (`node dist/cli/main.js …`) for the commands
 * that should load little, each paired run by run with a bare `node -e 0` (bare, command,
 * bare, command, … after one warm-up of each), so that a ratio holds while a shared machine's
 * speed drifts. CPU time (user + system of the child, all its threads) is what the start-up
 * costs; wall time on a loaded machine is mostly waiting. The child's CPU time comes from the
 * shell's `times` builtin (bash); without bash only wall times are printed.
 * Units: ms. Medians of 9 pairs.
 */
import { spawnSync } from 'node:child_process';
import { loadavg } from 'node:os';
import { fileURLToPath } from 'node:url';
import { median } from './timing.js';

const CLI = fileURLToPath(new URL('../cli/main.js', import.meta.url));
const RUNS = 9;
/** Issue 17's target for the cheap commands: CPU above a bare Node start, ms. */
const TARGET_ABOVE_BARE_MS = 60;

interface Run {
  wallMs: number;
  /** user + system ms of the child, or NaN without bash */
  cpuMs: number;
}

const hasBash = spawnSync('bash', ['-c', 'times'], { encoding: 'utf8' }).status === 0;

/** `times` prints the shell's own times, then its children's: "0m0.163s 0m0.008s". */
function childCpuMs(timesOutput: string): number {
  const children = timesOutput.trim().split('\n').at(-1) ?? '';
  const parts = [...children.matchAll(/(\d+)m([\d.]+)s/g)].map((m) => Number(m[1]) * 60_000 + Number(m[2]) * 1000);
  return parts.length === 2 ? parts[0] + parts[1] : Number.NaN;
}

function once(args: string[]): Run {
  const t0 = performance.now();
  const r = hasBash
    ? spawnSync('bash', ['-c', '"$@" >/dev/null 2>&1 || exit 97; times', 'startup-bench', process.execPath, ...args], { encoding: 'utf8' })
    : spawnSync(process.execPath, args, { stdio: 'ignore' });
  const wallMs = performance.now() - t0;
  if (r.status !== 0) throw new Error(`startup bench: node ${args.join(' ')} exited ${r.status === 97 ? 'with an error' : r.status}`);
  return { wallMs, cpuMs: hasBash ? childCpuMs(String(r.stdout)) : Number.NaN };
}

/** Pairs of (bare node, command), one warm-up pair first. */
function paired(args: string[]): { bare: Run[]; cmd: Run[] } {
  const bare: Run[] = [];
  const cmd: Run[] = [];
  for (let i = 0; i <= RUNS; i++) {
    const b = once(['-e', '0']);
    const c = once([CLI, ...args]);
    if (i > 0) {
      bare.push(b);
      cmd.push(c);
    }
  }
  return { bare, cmd };
}

const ms = (v: number) => `${v.toFixed(0)} ms`;

export function runStartupBench(): void {
  const load = () => loadavg()[0].toFixed(1);
  process.stdout.write(
    `\nstart-up (whole processes, medians of ${RUNS} runs paired with a bare \`node -e 0\`; ${hasBash ? 'CPU = user + system' : 'no bash: wall times only'}; load average ${load()} at the start)\n`,
  );
  // The first three are the cheap calls of the target; `solve --help` loads the full command line (commander, zod, a config schema).
  const targeted = new Set(['--version', 'spinodal --f 0.5', 'schema solve']);
  for (const args of [['--version'], ['spinodal', '--f', '0.5'], ['schema', 'solve'], ['solve', '--help']]) {
    const { bare, cmd } = paired(args);
    const key: keyof Run = hasBash ? 'cpuMs' : 'wallMs';
    const extra = median(cmd.map((c, i) => c[key] - bare[i][key]));
    const ratio = median(cmd.map((c, i) => c[key] / bare[i][key]));
    const what = hasBash ? 'CPU' : 'wall';
    process.stdout.write(
      `  mesofield ${args.join(' ')}: ${what} ${ms(median(cmd.map((c) => c[key])))} against bare ${ms(median(bare.map((b) => b[key])))}; ` +
        `${ms(extra)} above bare (median of pair differences), ratio ${ratio.toFixed(2)}; wall ${ms(median(cmd.map((c) => c.wallMs)))}` +
        `${targeted.has(args.join(' ')) ? `; target < ${TARGET_ABOVE_BARE_MS} ms above bare: ${extra < TARGET_ABOVE_BARE_MS ? 'met' : 'not met'}` : ''}\n`,
    );
  }
  process.stdout.write(`  load average ${load()} at the end\n`);
}
