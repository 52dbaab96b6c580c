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

// The build writes each kind's JSON Schema for `mesofield schema KIND` (scripts/build.mjs); the
// command prints that file. Independent check: the text made here from the sources, with the zod
// package itself (not the build's bundle), through z.toJSONSchema.
describe('the JSON Schema texts of the build', () => {
  it('dist/config-schemas/KIND.json is, for every kind, the text the zod schema makes now', async () => {
    const { CONFIG_KIND_NAMES } = await import('../../src/io/schemas/config-schema-loaders.js');
    const { configJsonSchemaText } = await import('../../src/io/schemas/config-json-schema.js');
    for (const kind of CONFIG_KIND_NAMES) expect(readFileSync(`dist/config-schemas/${kind}.json`, 'utf8'), kind).toBe(await configJsonSchemaText(kind));
  });

  it('a text older than the compiled schema list is not trusted (a plain tsc after the build)', async () => {
    const { mkdtempSync, mkdirSync, writeFileSync, utimesSync } = await import('node:fs');
    const { tmpdir } = await import('node:os');
    const { join } = await import('node:path');
    const { pathToFileURL } = await import('node:url');
    const { builtSchemaText } = await import('../../src/io/schemas/built-schema-text.js');
    const dist = mkdtempSync(join(tmpdir(), 'mesofield-schema-texts-'));
    mkdirSync(join(dist, 'config-schemas'));
    mkdirSync(join(dist, 'io', 'schemas'), { recursive: true });
    writeFileSync(join(dist, 'config-schemas', 'solve.json'), '{"built":true}\n');
    writeFileSync(join(dist, 'io', 'schemas', 'config-schema-loaders.js'), '');
    const url = pathToFileURL(`${dist}/`);
    utimesSync(join(dist, 'io', 'schemas', 'config-schema-loaders.js'), 1000, 1000);
    utimesSync(join(dist, 'config-schemas', 'solve.json'), 2000, 2000);
    expect(builtSchemaText('solve', url)).toBe('{"built":true}\n');
    utimesSync(join(dist, 'config-schemas', 'solve.json'), 500, 500);
    expect(builtSchemaText('solve', url)).toBeNull();
    expect(builtSchemaText('train', url)).toBeNull();
  });
});
