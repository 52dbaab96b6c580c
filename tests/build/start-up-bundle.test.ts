/**
 * The start-up bundle of the build (scripts/bundle-dependencies.mjs): zod and commander as one
 * file each in dist/vendor/, zod cut to the members dist/ uses (scripts/zod-members.mjs).
 * Checked here: the scan of those members on small programs written for the test; that dist/
 * has one zod and no import of the packages left; and that the bundled zod answers as the zod
 * package does (an independent implementation for this purpose: the package the bundle was cut
 * from, loaded by vitest from node_modules) on the project's own schemas — the same messages
 * for bad configs, the same JSON Schema.
 */
import { mkdtempSync, readdirSync, readFileSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { pathToFileURL } from 'node:url';
import { describe, expect, it } from 'vitest';
import { z as zodPackage } from 'zod';
import { solveConfigSchema } from '../../src/io/schemas/solve-config.js';
import { zodMembers } from '../../scripts/zod-members.mjs';

const dir = mkdtempSync(join(tmpdir(), 'mesofield-bundle-'));
let n = 0;
const program = (text: string) => {
  const file = join(dir, `m${n++}.js`);
  writeFileSync(file, text);
  return file;
};

describe('the members of zod a program uses', () => {
  it('reads z.member uses (also under another local name) and other named imports, across files', async () => {
    const a = program("import { z } from 'zod';\nexport const s = z.object({ a: z.number().min(0), z: z.string() });\nconst o = { z: 1 }; o.z;\n");
    const b = program("import { z as zz, ZodError } from 'zod';\nexport const t = zz.union([zz.literal('x'), zz.enum(['y'])]);\nexport const e = ZodError;\n");
    const c = program("export const none = 1;\n");
    expect(await zodMembers([a, b, c])).toEqual({ members: ['enum', 'literal', 'number', 'object', 'string', 'union'], named: ['ZodError'] });
  });

  it('reads a dist/ whose imports already point at the bundle (a second bundling of the same build)', async () => {
    const a = program("import { z } from '../vendor/zod.js';\nexport const s = z.boolean();\n");
    expect((await zodMembers([a])).members).toEqual(['boolean']);
  });

  it('refuses what it cannot read, naming the file and line: z as a value, shadowed, a namespace or dynamic import', async () => {
    const cases = [
      "import { z } from 'zod';\nexport const all = z;\n",
      "import { z } from 'zod';\nconst k = 'number';\nexport const s = z[k]();\n",
      "import { z } from 'zod';\nexport const f = (z) => z + 1;\n",
      "import { z } from 'zod';\nexport const o = { z };\n",
      "import * as zod from 'zod';\nexport const s = zod.z.number();\n",
      "import zod from 'zod';\nexport const s = zod.number();\n",
      "export const m = import('zod');\n",
      "export { z } from 'zod';\n",
    ];
    for (const text of cases) {
      const file = program(text);
      await expect(zodMembers([file]), text).rejects.toThrow(new RegExp(`${file.replace(/[.]/g, '\\.')}:\\d+`));
    }
  });

  it('refuses a member zod does not have, and a program with no zod at all', async () => {
    await expect(zodMembers([program("import { z } from 'zod';\nexport const s = z.notAZodMember();\n")])).rejects.toThrow(/z\.notAZodMember/);
    await expect(zodMembers([program('export const x = 1;\n')])).rejects.toThrow(/no import of zod/);
  });
});

const dist = join(process.cwd(), 'dist');
const distFiles = (readdirSync(dist, { recursive: true }) as string[]).filter((f) => f.endsWith('.js')).map((f) => join(dist, f));

describe('dist/ after the build', () => {
  it('imports zod and commander only through dist/vendor, and holds one copy of zod', () => {
    const bare = distFiles.filter((f) => /\b(from\s*|import\s*\(\s*|import\s+)['"](zod|commander)(\/[^'"]*)?['"]/.test(readFileSync(f, 'utf8')));
    expect(bare).toEqual([]);
    // zod's base class is declared once: one zod, so instanceof and schema identity hold across dist/.
    const zods = distFiles.filter((f) => readFileSync(f, 'utf8').includes('$constructor("ZodType"'));
    expect(zods.map((f) => f.slice(dist.length + 1))).toEqual([join('vendor', 'zod.js')]);
    expect(distFiles.filter((f) => /vendor[\\/]zod\.js['"]/.test(readFileSync(f, 'utf8'))).length).toBeGreaterThan(10);
  });

  it('the bundled zod answers as the zod package on the solve config: messages for bad input and the JSON Schema', async () => {
    const built = (await import(pathToFileURL(join(dist, 'io/schemas/solve-config.js')).href)) as { solveConfigSchema: typeof solveConfigSchema };
    const vendor = (await import(pathToFileURL(join(dist, 'vendor/zod.js')).href)) as { z: typeof zodPackage };
    const good = JSON.parse(readFileSync('configs/diblock-symmetric-chiN15.solve.json', 'utf8')) as Record<string, unknown>;
    const system = good.system as Record<string, unknown>;
    const bad: unknown[] = [
      good,
      { ...good, extra: 1 },
      { ...good, system: { ...system, chain: { type: 'star' } } },
      { ...good, system: { ...system, chain: { type: 'diblock', f: 'x' } } },
      { ...good, system: { ...system, chiN: -1 } },
      { ...good, cell: { ...(good.cell as object), nx: 100, period: 'wide' } },
      [1, 2],
      null,
    ];
    const issues = (r: { success: boolean; error?: { issues: unknown[] } }) => (r.success ? 'valid' : JSON.stringify(r.error!.issues));
    for (const input of bad) expect(issues(built.solveConfigSchema.safeParse(input)), JSON.stringify(input)).toBe(issues(solveConfigSchema.safeParse(input)));
    const opts = { io: 'input', unrepresentable: 'any' } as const;
    expect(vendor.z.toJSONSchema(built.solveConfigSchema, opts)).toEqual(zodPackage.toJSONSchema(solveConfigSchema, opts));
    // The package gives these messages in English by default; so must the cut bundle.
    expect(issues(built.solveConfigSchema.safeParse(bad[3]))).toMatch(/Invalid input: expected number, received string/);
  });
});
