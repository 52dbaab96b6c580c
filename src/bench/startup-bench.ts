/**
 * Start-up of the command line: wall time of whole processes (`node dist/cli/main.js …`) for
 * the commands that should load little, against a bare `node -e 0`; medians of 9 runs after
 * one warm-up. Commands load their code on demand (cli/command-specs.ts): these figures show
 * whether that still holds.
 */
import { spawnSync } from 'node:child_process';
import { fileURLToPath } from 'node:url';
import { median } from './timing.js';

const CLI = fileURLToPath(new URL('../cli/main.js', import.meta.url));

function wallMs(args: string[], runs = 9): number {
  const t: number[] = [];
  for (let i = 0; i <= runs; i++) {
    const t0 = performance.now();
    const r = spawnSync(process.execPath, args, { stdio: 'ignore' });
    if (r.status !== 0) throw new Error(`startup bench: node ${args.join(' ')} exited ${r.status}`);
    if (i > 0) t.push(performance.now() - t0);
  }
  return median(t);
}

export function runStartupBench(): void {
  const bare = wallMs(['-e', '0']);
  process.stdout.write(`\nstart-up (whole process, median of 9 wall times; a shared machine: compare with the bare node line)\n  node -e 0: ${bare.toFixed(0)} ms\n`);
  for (const cmd of [['--version'], ['spinodal', '--f', '0.5'], ['schema', 'solve'], ['solve', '--help']]) {
    const ms = wallMs([CLI, ...cmd]);
    process.stdout.write(`  mesofield ${cmd.join(' ')}: ${ms.toFixed(0)} ms (${(ms - bare).toFixed(0)} ms above bare node)\n`);
  }
}
