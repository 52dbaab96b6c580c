#!/usr/bin/env node
/**
 * `npm run build` (also scripts/setup.sh and the test setup): src/ is compiled into dist/ file
 * by file without type checking (scripts/transpile-sources.mjs; the type check is
 * `npm run typecheck` and a file of the test suite), then zod and commander are bundled for
 * start-up (scripts/bundle-dependencies.mjs), and each
 * config kind's JSON Schema is written into dist/config-schemas/ for `mesofield schema KIND`
 * (src/io/schemas/config-json-schema.ts makes the text; the command prints the file).
 * A plain `tsc -p tsconfig.json` also gives a working dist/, only with the slower start-up.
 */
import { mkdirSync, rmSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { fileURLToPath, pathToFileURL } from 'node:url';
import { bundleDependencies } from './bundle-dependencies.mjs';
import { transpileSources } from './transpile-sources.mjs';

const root = fileURLToPath(new URL('..', import.meta.url));
const dist = join(root, 'dist');
// BUILT_SCHEMA_FOLDER of src/io/schemas/config-schema-loaders.ts, named here because the old
// build's texts go before the compile: if this build fails they must not outlive it.
const schemaTexts = join(dist, 'config-schemas');
rmSync(schemaTexts, { recursive: true, force: true });
try {
  transpileSources(root);
} catch (e) {
  process.stderr.write(`build: ${e?.message ?? e}\n`);
  process.exit(1);
}
await bundleDependencies(root);

/** Each kind's JSON Schema text, written last (the command trusts a file newer than the compiled schemas). */
async function writeSchemaTexts() {
  const { configJsonSchemaText } = await import(pathToFileURL(join(dist, 'io/schemas/config-json-schema.js')).href);
  const { CONFIG_KIND_NAMES, BUILT_SCHEMA_FOLDER } = await import(pathToFileURL(join(dist, 'io/schemas/config-schema-loaders.js')).href);
  if (join(dist, BUILT_SCHEMA_FOLDER) !== schemaTexts) throw new Error(`the schema folder is ${BUILT_SCHEMA_FOLDER} in the sources but ${schemaTexts} here`);
  mkdirSync(schemaTexts, { recursive: true });
  for (const kind of CONFIG_KIND_NAMES) writeFileSync(join(schemaTexts, `${kind}.json`), await configJsonSchemaText(kind));
}
try {
  await writeSchemaTexts();
} catch (e) {
  rmSync(schemaTexts, { recursive: true, force: true });
  process.stderr.write(`build: writing the config kinds' JSON Schemas failed (${e?.message ?? e}); \`mesofield schema\` generates them at each call instead\n`);
}
