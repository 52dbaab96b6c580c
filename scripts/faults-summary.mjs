#!/usr/bin/env node
/**
 * `npm run faults:summary`: runs the fault-injection suite (tests/faults) and prints its
 * counts per group — tried, ended in a clear error, ended in a correct answer, wrong — as the
 * table the README's "Reliability" section quotes. The counts are the suite's own (each test
 * file hands them over through MESOFIELD_FAULT_TALLY); the exit code is the suite's.
 * Build first (`npm run build`): the signal cases run dist/.
 */
import { spawnSync } from 'node:child_process';
import { existsSync, mkdtempSync, readdirSync, readFileSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';

const dir = mkdtempSync(join(tmpdir(), 'mesofield-fault-tally-'));
// The suite's stderr is kept and shown only when it failed or reported nothing: the in-process
// signal cases write the tool's own stop messages there, which are not part of the table.
const run = spawnSync('npx', ['vitest', 'run', 'tests/faults', ...process.argv.slice(2)], {
  stdio: ['ignore', 'ignore', 'pipe'],
  encoding: 'utf8',
  maxBuffer: 64 * 1024 * 1024,
  env: { ...process.env, MESOFIELD_FAULT_TALLY: dir, MESOFIELD_SKIP_BUILD: process.env.MESOFIELD_SKIP_BUILD ?? '1' },
});
const groups = new Map();
for (const f of existsSync(dir) ? readdirSync(dir).sort() : []) {
  for (const [g, c] of Object.entries(JSON.parse(readFileSync(join(dir, f), 'utf8')))) {
    const t = groups.get(g) ?? { tried: 0, 'clear error': 0, 'correct answer': 0, wrong: 0 };
    for (const k of Object.keys(t)) t[k] += c[k] ?? 0;
    groups.set(g, t);
  }
}
rmSync(dir, { recursive: true, force: true });
const total = { tried: 0, 'clear error': 0, 'correct answer': 0, wrong: 0 };
const rows = [...groups].map(([g, t]) => {
  for (const k of Object.keys(total)) total[k] += t[k];
  return `| ${g} | ${t.tried} | ${t['clear error']} | ${t['correct answer']} | ${t.wrong} |`;
});
process.stdout.write(['| group | tried | clear error | correct answer | wrong |', '| --- | ---: | ---: | ---: | ---: |', ...rows, `| all | ${total.tried} | ${total['clear error']} | ${total['correct answer']} | ${total.wrong} |`, ''].join('\n'));
if (run.status !== 0 || groups.size === 0) process.stderr.write(run.stderr ?? '');
if (run.error) process.stderr.write(`faults:summary: could not run the suite: ${run.error.message}\n`);
if (groups.size === 0) process.stderr.write('faults:summary: the suite reported no counts (did it run? see above)\n');
process.exit(run.status ?? 1);
