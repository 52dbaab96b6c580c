import { readFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import { CONFIG_SCHEMAS } from '../../src/io/schemas/config-schemas.js';
import { configReferenceMarkdown } from '../../src/io/config-reference.js';

describe('config reference', () => {
  it('docs/config-reference.md is what the schemas generate (regenerate: mesofield schema --markdown)', () => {
    expect(readFileSync('docs/config-reference.md', 'utf8')).toBe(configReferenceMarkdown(CONFIG_SCHEMAS));
  });

  it('states the checks JSON Schema cannot express (power of two, even counts, lo < hi)', () => {
    const md = configReferenceMarkdown(CONFIG_SCHEMAS);
    expect(md).toMatch(/\| `cell\.nx` \| integer \\\| "auto" \| ≥ 8, ≤ 8192, a power of two \| `"auto"` \|/);
    expect(md).toMatch(/\| `collocation\.nodesPerBlock` \| integer \| ≥ 4, ≤ 512, even \|/);
    expect(md).toMatch(/\| `chiNRange` \| .* lo < hi \|/);
    expect(md).not.toContain('9007199254740991');
  });

  it('lists every kind with its defaults and bounds', () => {
    const md = configReferenceMarkdown(CONFIG_SCHEMAS);
    for (const kind of ['solve', 'train', 'invert', 'sweep']) expect(md).toContain(`## kind "${kind}"`);
    expect(md).toMatch(/\| `training\.learningRate` \| number \| > 0, < 1 \| `0\.002` \|/);
    expect(md).toMatch(/\| `system\.chain \(type = "diblock"\)\.f` \| number \| > 0, < 1 \| required \|/);
    expect(md).toMatch(/\| `parameters\.chiN` \| array of number \\\| \{from, to, count\} \| values ≥ 0, ≤ 500, ≥ 1 items, ≤ 10000 items; count 1 needs from = to \| required \|/);
  });
});
