// The CLI tests run the built program: compile once before any test file starts.
// (MESOFIELD_SKIP_BUILD=1 skips it when dist/ is known to be fresh.)
import { execFileSync } from 'node:child_process';

export default function setup(): void {
  if (process.env.MESOFIELD_SKIP_BUILD === '1') return;
  execFileSync(process.execPath, ['node_modules/typescript/bin/tsc', '-p', 'tsconfig.json'], { stdio: 'inherit' });
}
