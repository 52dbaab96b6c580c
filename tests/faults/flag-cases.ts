/**
 * Flags of every command: numbers typed in ways JavaScript would quietly accept (0x10, "",
 * 1e999, 1e-400, Infinity), values out of range, words not allowed, unknown flags and
 * commands, missing arguments. Each must exit 2 naming the flag and the value.
 */
import type { FaultCase, Sandbox } from './harness.js';
import { PROFILE_CSV } from './profiles.js';

type Prefix = (s: Sandbox) => string[];

function flagCase(command: string, prefix: Prefix, flag: string, value: string, message: RegExp): FaultCase {
  return { group: 'flags', name: `${command} ${flag} ${JSON.stringify(value)}`, argv: (s) => [...prefix(s), flag, value, '--quiet'], code: 2, message };
}

const NUMBER_FORMS: [string, RegExp][] = [
  ['abc', /got "abc"; allowed: a number/],
  ['0x10', /got "0x10"; allowed: a number in decimal notation/],
  ['', /got "" \(empty\); allowed: a number/],
  ['1e999', /got 1e999, which is beyond the range of a double \(got Infinity\)/],
  ['1e-400', /got 1e-400, which is too small to represent/],
  ['Infinity', /got "Infinity"; allowed: a number in decimal notation/],
  ['1,5', /got "1,5"; allowed: a number in decimal notation/],
];

const solve: Prefix = () => ['solve'];
const synth: Prefix = () => ['synth', '--f', '0.5', '--chiN', '15'];
const invert: Prefix = (s) => ['invert', s.write('p.csv', PROFILE_CSV), '--f', '0.5'];
const spinodal: Prefix = () => ['spinodal'];
const sweepCfg: Prefix = (s) => ['sweep', s.json('sw.json', { version: 2, kind: 'sweep', system: { chain: { type: 'diblock' } }, parameters: { chiN: [14], f: [0.5], segmentRatio: [1] }, cell: { period: 3.7, nx: 16, ns: 20 } }), '--out', s.path('sw')];

const numberFlags: [string, Prefix, string[]][] = [
  ['solve', solve, ['--chiN', '--f', '--nx', '--ns', '--periods', '--tolerance']],
  ['synth', synth, ['--points', '--noise', '--seed', '--offset', '--resolution', '--nx', '--rg-nm']],
  ['invert', invert, ['--seeds', '--nx', '--resolution', '--profile-points', '--rg-nm', '--workers']],
  ['spinodal', spinodal, ['--f', '--segment-ratio']],
];

const forms: FaultCase[] = numberFlags.flatMap(([cmd, prefix, flags]) =>
  flags.flatMap((flag) => NUMBER_FORMS.map(([v, msg]) => flagCase(cmd, prefix, flag, v, new RegExp(`${flag.replace(/-/g, '\\-')}: ${msg.source}`)))),
);

const specific: FaultCase[] = [
  flagCase('solve', solve, '--f', '1.5', /--f → system\.chain\.f: got 1\.5/),
  flagCase('solve', solve, '--chiN', '-3', /--chiN → system\.chiN: got -3/),
  flagCase('solve', solve, '--nx', '100', /--nx → cell\.nx: got 100;.*power of two/),
  flagCase('solve', solve, '--period', 'optimise', /--period: got "optimise"; allowed: a period in Rg \(a number > 0\), or "equilibrium" \(the stress-free period is "equilibrium"\)/),
  flagCase('solve', solve, '--period', '0', /--period → cell\.period: got 0/),
  flagCase('solve', solve, '--chain', 'star', /--chain → system\.chain\.type: got "star"/),
  flagCase('solve', solve, '--start', 'no-such-file.json', /no-such-file\.json: cannot read the file \(ENOENT\)/),
  flagCase('synth', synth, '--period', 'optimize', /--period: got "optimize"/),
  flagCase('synth', synth, '--points', '1', /--points: got 1;/),
  flagCase('synth', synth, '--noise', '-0.1', /--noise: got -0\.1;/),
  flagCase('synth', () => ['synth', '--chiN', '15'], '--f', '1', /--f: got 1;/),
  flagCase('invert', invert, '--method', 'bayes', /--method → method: got "bayes"/),
  flagCase('invert', invert, '--period', 'eq', /--period: got "eq"; allowed: a period in Rg \(a number > 0\), or "equilibrium", "free"/),
  flagCase('invert', invert, '--chiN-range', '40,11', /--chiN-range: got "40,11"; allowed: 0 < lo < hi/),
  flagCase('invert', invert, '--chiN-range', '0x10,20', /--chiN-range: got "0x10,20"; allowed: two numbers/),
  flagCase('invert', invert, '--backend', 'gpu', /--backend → network\.backend: got "gpu"/),
  flagCase('invert', invert, '--strategy', 'lbfgs', /--strategy → network\.strategy: got "lbfgs"/),
  // A budget of the strategy not run (the default strategy is least-squares): refused, not ignored.
  flagCase('invert', invert, '--adam-steps', '500', /--adam-steps → network\.adamSteps: got 500; allowed only with network\.strategy "adam-lbfgs"/),
  flagCase('invert', invert, '--workers', '0', /--workers: got 0; allowed: a whole number from 1 to 64/),
  flagCase('invert', invert, '--workers', '2.5', /--workers: got 2\.5/),
  flagCase('spinodal', spinodal, '--chain', 'star', /type: got "star"/),
  flagCase('spinodal', spinodal, '--f', '0', /f: got 0/),
  flagCase('report', (s) => ['report', s.mkdir('run')], '--dpi', '10', /--dpi: got 10; allowed: a whole number from 36 to 1200/),
  flagCase('report', (s) => ['report', s.mkdir('run')], '--format', 'gif', /--format: got "gif"; allowed: a comma-separated list of pdf, png/),
  flagCase('report', (s) => ['report', s.mkdir('run')], '--rg-nm', '-1', /--rg-nm: got -1; allowed: Rg in nm/),
  flagCase('sweep', sweepCfg, '--shard', '3/2', /--shard/),
  flagCase('sweep', sweepCfg, '--shard', 'a/b', /--shard/),
  flagCase('sweep', sweepCfg, '--workers', '0', /--workers: got 0/),
  flagCase('train', (s) => ['train', s.json('t.json', { version: 2, kind: 'train', system: { chain: { type: 'diblock', f: 0.5 }, chiN: 15 } }), '--out', s.path('t')], '--adam-steps', '-1', /--adam-steps: got -1; allowed: a whole number ≥ 0/),
  flagCase('train', (s) => ['train', s.json('t.json', { version: 2, kind: 'train', system: { chain: { type: 'diblock', f: 0.5 }, chiN: 15 } }), '--out', s.path('t')], '--backend', 'gpu', /--backend: got "gpu"; allowed: auto, native, wasm, cpu/),
  flagCase('predict', (s) => ['predict', s.mkdir('ck'), '--chiN', '15'], '--points', '0', /--points/),
  flagCase('evaluate', (s) => ['evaluate', s.mkdir('ck')], '--backend', 'gpu', /--backend: got "gpu"/),
];

const plain = (name: string, argv: (s: Sandbox) => string[], message: RegExp): FaultCase => ({ group: 'flags', name, argv, code: 2, message });

const usage: FaultCase[] = [
  plain('unknown command', () => ['solvee'], /unknown command 'solvee'/),
  plain('unknown flag on solve', () => ['solve', '--chin', '15'], /unknown option '--chin'/),
  plain('flag without its value', () => ['solve', '--chiN'], /option '--chiN <x>' argument missing/),
  plain('invert without a profile', () => ['invert'], /missing required argument 'profile'/),
  plain('invert without --f or a config', (s) => ['invert', s.write('p.csv', PROFILE_CSV)], /--f: missing; the A fraction f of the chain is required/),
  plain('report on a missing folder', (s) => ['report', s.path('none')], /none/),
  plain('train without a config', () => ['train'], /missing required argument 'config'/),
  plain('sweep without a config', () => ['sweep'], /config: missing/),
  plain('sweep --merge without --out', (s) => ['sweep', '--merge', s.mkdir('m')], /--out: missing; --merge needs/),
  plain('schema without a kind', () => ['schema'], /kind: missing/),
  plain('schema of an unknown kind', () => ['schema', 'banana'], /kind: got "banana"/),
  plain('evaluate a folder that is not a checkpoint', (s) => ['evaluate', s.mkdir('ck')], /not a checkpoint directory/),
  plain('predict from a folder that is not a checkpoint', (s) => ['predict', s.mkdir('ck'), '--chiN', '15'], /ck/),
  plain('--overwrite without --out', () => ['solve', '--overwrite', '--quiet'], /--overwrite: given without --out/),
  plain('synth without --chiN', () => ['synth', '--f', '0.5'], /--chiN: missing/),
];

export const FLAG_CASES: FaultCase[] = [...forms, ...specific, ...usage];
