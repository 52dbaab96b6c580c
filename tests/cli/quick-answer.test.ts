/**
 * The quick answers (src/cli/quick-answer.ts) must be the full command line's answers, only
 * sooner. Independent method: the full path itself, commander reading the flags and zod's
 * chainSchema validating them (run in this process through runCli), on many inputs, the fault
 * suite's bad ones among them; and whole processes of the built program against it, stdout,
 * stderr and exit code, for good and bad calls alike.
 */
import { spawnSync } from 'node:child_process';
import { describe, expect, it } from 'vitest';
import { quickAnswer } from '../../src/cli/quick-answer.js';
import { runCli } from '../../src/cli/run-cli.js';
import { spinodalAnswer } from '../../src/cli/spinodal-answer.js';
import { quickSpinodalFlags } from '../../src/cli/spinodal-quick-flags.js';
import { CONFIG_KIND_NAMES } from '../../src/io/schemas/config-schema-loaders.js';
import { FLAG_CASES } from '../faults/flag-cases.js';
import { sandbox } from '../faults/harness.js';
import { CLI } from '../helpers/run-cli.js';

/** Argument lists after `spinodal`: forms of each flag, values inside and outside the schema's bounds. */
function spinodalInputs(): string[][] {
  const out: string[][] = [[], ['--json'], ['--quiet'], ['--json', '--quiet']];
  const fs = ['0.5', '0.3', '.25', '1e-1', ' 0.4', '0.999', '+0.7', '1', '0', '-0.2', '1.5', 'abc', '0x1', '1e-400', '1e999', 'Infinity', '', '0,5', 'NaN'];
  for (const f of fs) out.push(['--f', f], [`--f=${f}`], ['--f', f, '--json']);
  for (const r of ['1', '10', '10.0001', '0.5', '0', '-1', '2e0', 'x']) out.push(['--f', '0.4', '--segment-ratio', r], [`--segment-ratio=${r}`]);
  for (const chain of ['diblock', 'triblock', 'homopolymer', 'blocks', 'star', 'Diblock', '']) {
    for (const t of ['0.5', '0.2', '0', '1', 'abc']) out.push(['--chain', chain, '--f', '0.3', '--first-block-share', t], [`--chain=${chain}`, `--first-block-share=${t}`, '--json']);
  }
  out.push(
    ['--f', '0.3', '--f', '0.6'], // the last one given wins, as commander reads it
    ['--chain', 'triblock', '--chain', 'diblock', '--f', '0.4'],
    ['--f'], // a flag without its value
    ['--f', '-0.3'],
    ['--f', '--json'],
    ['--unknown'],
    ['--json=1'],
    ['extra'],
    ['--help'],
    ['-h'],
    ['--debug'],
    ['--', '--f', '0.3'],
    ['--f', '0.3', 'extra'],
    ['--F', '0.3'],
    ['--version'],
  );
  return out;
}

describe('spinodal: the quick reading of the flags against commander and zod', () => {
  it('every call the quick path takes gives exactly what the full command prints; the rest it leaves to the command', async () => {
    let taken = 0;
    let left = 0;
    for (const args of spinodalInputs()) {
      const quick = quickSpinodalFlags(args);
      const full = await runCli(['spinodal', ...args], { capture: true });
      if (quick === null) {
        left++;
        continue;
      }
      taken++;
      expect({ args, code: full.code, stderr: full.stderr }).toEqual({ args, code: 0, stderr: '' });
      expect(spinodalAnswer(quick.spec, quick.json), JSON.stringify(args)).toBe(full.stdout);
    }
    // Both branches ran on many inputs (so the comparison above saw the quick path at work).
    expect(taken).toBeGreaterThan(40);
    expect(left).toBeGreaterThan(40);
  }, 60_000);

  it('the ordinary well-formed calls are taken', () => {
    for (const args of [[], ['--f', '0.3'], ['--f=0.3', '--json'], ['--chain', 'triblock', '--f', '0.4', '--first-block-share', '0.3', '--segment-ratio', '2', '--quiet']]) {
      expect(quickSpinodalFlags(args), JSON.stringify(args)).not.toBeNull();
    }
  });

  it('no bad input of the fault suite is answered quickly (each gets the full command and its message)', async () => {
    const s = sandbox();
    let seen = 0;
    for (const c of FLAG_CASES) {
      const argv = c.argv(s);
      if (argv[0] === 'spinodal' || argv[0] === 'schema') seen++;
      expect(await quickAnswer(argv), c.name).toBeNull();
    }
    expect(seen).toBeGreaterThan(10);
  });
});

describe('the built program: quick answers and full answers are the same processes to a user', () => {
  const calls: string[][] = [
    ['--version'],
    ['-V'],
    ['spinodal'],
    ['spinodal', '--f', '0.3', '--json'],
    ['spinodal', '--chain', 'triblock', '--f', '0.4', '--first-block-share', '0.25', '--segment-ratio', '1.5'],
    ['spinodal', '--f', '1.5'],
    ['spinodal', '--f', '0x10'],
    ['spinodal', '--chain', 'star'],
    ['spinodal', '--f'],
    ...CONFIG_KIND_NAMES.map((k) => ['schema', k]),
    ['schema', 'banana'],
    ['schema', 'constructor'],
  ];
  it('stdout, stderr and exit code of `node dist/cli/main.js …` equal the full command line run in this process', async () => {
    for (const args of calls) {
      const p = spawnSync(process.execPath, [CLI, ...args], { encoding: 'utf8', timeout: 60_000 });
      const full = await runCli(args, { capture: true });
      expect({ args, code: p.status, stdout: p.stdout, stderr: p.stderr }).toEqual({ args, code: full.code, stdout: full.stdout, stderr: full.stderr });
    }
  }, 120_000);
});
