import { readFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import { CONFIG_SCHEMAS } from '../../src/io/schemas/config-schemas.js';
import { configReferenceMarkdown } from '../../src/io/config-reference.js';

describe('config reference', () => {
  it('docs/config-reference.md is what the schemas generate (regenerate: mesofield schema --markdown)', () => {
    expect(readFileSync('docs/config-reference.md', 'utf8')).toBe(configReferenceMarkdown(CONFIG_SCHEMAS));
  });

  it('lists every kind with its defaults and bounds', () => {
    const md = configReferenceMarkdown(CONFIG_SCHEMAS);
    for (const kind of ['solve', 'train', 'invert', 'sweep']) expect(md).toContain(`## kind "${kind}"`);
    expect(md).toMatch(/\| `training\.learningRate` \| number \| > 0, < 1 \| `0\.002` \|/);
    expect(md).toMatch(/\| `system\.chain \(type = "diblock"\)\.f` \| number \| > 0, < 1 \| required \|/);
    expect(md).toMatch(/\| `parameters\.chiN` \| array of number \\\| \{from, to, count\} \| values ≥ 0, ≤ 500, ≥ 1 items, ≤ 10000 items \| required \|/);
  });
});
