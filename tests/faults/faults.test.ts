/**
 * The fault-injection suite (README "Reliability"): every case of the tables runs in this
 * process through runCli, and the summary prints, per group, how many were tried, how many
 * ended in a clear error (the expected exit code and message, no stack trace, no file touched)
 * and how many in a correct answer (exit 0, checked against an identity, a handbook formula
 * or an independent run). Signals are in signals.test.ts and signals-solve-demo.test.ts (they need real processes).
 */
import { afterAll, describe, expect, it } from 'vitest';
import { CONFIG_CASES } from './config-cases.js';
import { FLAG_CASES } from './flag-cases.js';
import { runCase } from './harness.js';
import type { FaultCase, Outcome } from './harness.js';
import { OUTPUT_CASES } from './output-cases.js';
import { PHYSICS_CASES } from './physics-cases.js';
import { writeTally } from './tally.js';
import { CSV_ANSWER_CASES, CSV_CASES } from './profiles.js';

const ALL: FaultCase[] = [...CONFIG_CASES, ...FLAG_CASES, ...CSV_CASES, ...CSV_ANSWER_CASES, ...OUTPUT_CASES, ...PHYSICS_CASES];
const tally = new Map<string, Record<Outcome | 'tried', number>>();

describe('fault injection', () => {
  for (const c of ALL) {
    it(`${c.group}: ${c.name}`, async () => {
      const { problems, outcome } = await runCase(c);
      const t = tally.get(c.group) ?? { tried: 0, 'clear error': 0, 'correct answer': 0, wrong: 0 };
      t.tried++;
      t[outcome]++;
      tally.set(c.group, t);
      if (problems.length) console.log(`PROBLEM ${c.group}: ${c.name}\n${problems.join('\n')}`);
      expect(problems.join('\n')).toBe('');
    });
  }

  it('has at least 200 cases with unique names', () => {
    expect(ALL.length).toBeGreaterThanOrEqual(200);
    expect(new Set(ALL.map((c) => `${c.group}: ${c.name}`)).size).toBe(ALL.length);
  });
});

afterAll(() => {
  writeTally('faults', tally);
  const rows = [...tally].map(([g, t]) => `| ${g} | ${t.tried} | ${t['clear error']} | ${t['correct answer']} | ${t.wrong} |`);
  const total = [...tally.values()].reduce((s, t) => ({ tried: s.tried + t.tried, clear: s.clear + t['clear error'], correct: s.correct + t['correct answer'], wrong: s.wrong + t.wrong }), { tried: 0, clear: 0, correct: 0, wrong: 0 });
  process.stdout.write(['', '| group | tried | clear error | correct answer | wrong |', '| --- | --- | --- | --- | --- |', ...rows, `| all | ${total.tried} | ${total.clear} | ${total.correct} | ${total.wrong} |`, ''].join('\n'));
});
