// The CLI tests run the built program: compile once before any test file starts.
// (MESOFIELD_SKIP_BUILD=1 skips it when dist/ is known to be fresh.)
import { execFileSync } from 'node:child_process';

export default function setup(): void {
  if (process.env.MESOFIELD_SKIP_BUILD === '1') return;
  // The same build as `npm run build`: tsc, then zod and commander bundled for start-up.
  execFileSync(process.execPath, ['scripts/build.mjs'], { stdio: 'inherit' });
}
