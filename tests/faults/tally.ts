/**
 * The fault suite's counts per group (tried / clear error / correct answer / wrong), handed
 * to `npm run faults:summary` (scripts/faults-summary.mjs): when MESOFIELD_FAULT_TALLY names a
 * folder, each test file writes its counts there as JSON; the script adds them up and prints
 * the table. Without the variable nothing is written.
 */
import { mkdirSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';

export interface GroupCounts {
  tried: number;
  'clear error': number;
  'correct answer': number;
  wrong: number;
}

export function writeTally(file: string, groups: Map<string, GroupCounts> | Record<string, GroupCounts>): void {
  const dir = process.env.MESOFIELD_FAULT_TALLY;
  if (!dir) return;
  mkdirSync(dir, { recursive: true });
  const rows = groups instanceof Map ? Object.fromEntries(groups) : groups;
  writeFileSync(join(dir, `${file}.json`), `${JSON.stringify(rows, null, 1)}\n`);
}
