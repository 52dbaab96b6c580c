/**
 * The order test files start in: longest first (longest-processing-time-first scheduling), so
 * that the two workers finish at about the same time instead of one running a long file alone at
 * the end.
 *
 * Vitest orders by its own cached durations when it has them for every file. On a fresh clone
 * (CI, `make test` after a clone) it has none and orders by file size, which puts the short
 * files with the longest runs (the network estimator tests, a few dozen lines each) last. Then
 * the measured seconds in tests/file-durations.json decide; files not listed there (new ones)
 * start first, as vitest itself starts files it does not know.
 */
import { readFileSync } from 'node:fs';
import { relative } from 'node:path';
import { BaseSequencer } from 'vitest/node';
import type { TestSpecification } from 'vitest/node';

const measured = (JSON.parse(readFileSync(new URL('./file-durations.json', import.meta.url), 'utf8')) as { seconds: Record<string, number> }).seconds;

export class LongestFirstSequencer extends BaseSequencer {
  override async sort(files: TestSpecification[]): Promise<TestSpecification[]> {
    const byVitest = await super.sort(files);
    const root = this.ctx.config.root;
    const key = (f: TestSpecification) => relative(root, f.moduleId).split('\\').join('/');
    const cached = (f: TestSpecification) => this.ctx.cache.getFileTestResults(`${f.project.name}:${key(f)}`);
    if (byVitest.every((f) => cached(f) !== undefined)) return byVitest;
    const seconds = (f: TestSpecification) => measured[key(f)] ?? 1e9;
    // Array.prototype.sort is stable: files with equal weight keep vitest's order.
    return [...byVitest].sort((a, b) => seconds(b) - seconds(a));
  }
}
