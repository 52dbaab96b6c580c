#!/usr/bin/env node
/**
 * `npm run build` (also scripts/setup.sh and the test setup): tsc compiles src/ into dist/,
 * then zod and commander are bundled for start-up (scripts/bundle-dependencies.mjs).
 * A plain `tsc -p tsconfig.json` also gives a working dist/, only with the slower start-up.
 */
import { spawnSync } from 'node:child_process';
import { fileURLToPath } from 'node:url';
import { bundleDependencies } from './bundle-dependencies.mjs';

const root = fileURLToPath(new URL('..', import.meta.url));
const tsc = spawnSync(process.execPath, [fileURLToPath(new URL('../node_modules/typescript/bin/tsc', import.meta.url)), '-p', 'tsconfig.json'], {
  cwd: root,
  stdio: 'inherit',
});
if (tsc.status !== 0) process.exit(tsc.status ?? 1);
await bundleDependencies(root);
