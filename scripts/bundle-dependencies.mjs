/**
 * Start-up: zod and commander each as one file in dist/vendor/, and every module of dist/
 * importing those files instead of the packages.
 *
 * Why: Node 20 has no module compile cache, and each module file costs a resolve, a read and
 * a compile. zod 4 is about 180 module files and `spinodal` or `schema` spent most of their
 * start-up loading them; commander is a CommonJS package of 7 files behind an ES wrapper.
 * One file each loads several times faster (docs/performance.md, "Start-up").
 *
 * Why a rewrite of dist/ and not package.json "imports" (`#zod`): the TypeScript sources keep
 * importing 'zod', so tsc and vitest (which runs the sources) resolve the package exactly as
 * before and the tests that import zod themselves share its one instance; only the built
 * program changes. A subpath import would have to choose between the bundle and the package
 * by a condition that tsc, vitest and plain Node all agree on, and every source file would
 * change its import. If bundling fails, dist/ is left as tsc wrote it: it still runs, with
 * the slower start-up, and the build says so.
 *
 * One instance: every module of dist/ imports the same dist/vendor/zod.js, so `instanceof
 * ZodError` and schema identity hold across the program exactly as with the package.
 */
import { readdirSync, readFileSync, writeFileSync, mkdirSync, rmSync, renameSync } from 'node:fs';
import { dirname, join, relative, sep } from 'node:path';

/** Packages bundled, each into dist/vendor/<name>.js. */
export const BUNDLED = ['zod', 'commander'];

// An import of exactly one of BUNDLED: `from 'zod'`, `import 'zod'`, `import('zod')`.
const SPECIFIER = new RegExp(String.raw`(\bfrom\s*|\bimport\s*\(\s*|\bimport\s+)(['"])(${BUNDLED.join('|')})\2`, 'g');

function jsFiles(dir, skip) {
  const out = [];
  for (const entry of readdirSync(dir, { withFileTypes: true })) {
    const path = join(dir, entry.name);
    if (entry.isDirectory()) {
      if (path !== skip) out.push(...jsFiles(path, skip));
    } else if (entry.name.endsWith('.js')) out.push(path);
  }
  return out;
}

function packageVersion(root, name) {
  return JSON.parse(readFileSync(join(root, 'node_modules', name, 'package.json'), 'utf8')).version;
}

/**
 * zod's entry, cut to what dist/ uses (zod-members.mjs): `z` holds only the members the program
 * calls, so the bundler leaves out the rest of zod (other languages' messages, JSON Schema
 * import, the compiled fast path…), which would be compiled at every start for nothing. What
 * the kept members need stays, by the bundler's own tracing, with zod's declared side effects.
 */
function zodEntry(used) {
  const ENTRY = '\0mesofield-zod-entry';
  const MEMBERS = '\0mesofield-zod-members';
  return {
    name: 'mesofield-zod-used-members',
    resolveId(id) {
      return id === ENTRY || id === MEMBERS ? id : null;
    },
    load(id) {
      if (id === ENTRY) return [`export * as z from ${JSON.stringify(MEMBERS)};`, ...(used.named.length ? [`export { ${used.named.join(', ')} } from 'zod';`] : [])].join('\n');
      if (id === MEMBERS) return `export { ${used.members.join(', ')} } from 'zod';\n`;
      return null;
    },
  };
}

/**
 * commander requires node:child_process at load for one feature, subcommands that are separate
 * executables (`childProcess.spawn`), which mesofield does not use; loading it pulls in net,
 * dgram and the socket machinery at every start. The require is deferred to the first spawn.
 * The plugin fails the bundle unless it finds that require once and `spawn` as its only use.
 */
function deferChildProcess() {
  const COMMAND = /[\\/]commander[\\/]lib[\\/]command\.js$/;
  const REQUIRE = "const childProcess = require('node:child_process');";
  let seen = false;
  return {
    name: 'mesofield-commander-defer-child-process',
    transform(code, id) {
      if (!COMMAND.test(id)) return null;
      const uses = code.match(/\bchildProcess\.\w+/g) ?? [];
      if (code.split(REQUIRE).length !== 2 || uses.some((u) => u !== 'childProcess.spawn')) {
        throw new Error(`commander's lib/command.js no longer matches (${REQUIRE} once, childProcess.spawn its only use)`);
      }
      seen = true;
      return code.replace(REQUIRE, "const childProcess = { spawn: (...args) => require('node:child_process').spawn(...args) };");
    },
    buildEnd() {
      if (!seen) throw new Error("commander's lib/command.js was not found where expected");
    },
  };
}


/** Bundle each package into a temporary folder, then move the folder into place. */
async function writeBundles(root, vendor, usedZod) {
  const { build } = await import('rolldown');
  const inputs = { zod: '\0mesofield-zod-entry', commander: 'commander' };
  const plugins = { zod: () => [zodEntry(usedZod)], commander: () => [deferChildProcess()] };
  const staging = `${vendor}.tmp`;
  rmSync(staging, { recursive: true, force: true });
  for (const name of BUNDLED) {
    await build({
      input: { [name]: inputs[name] },
      cwd: root,
      platform: 'node',
      logLevel: 'warn',
      plugins: plugins[name](),
      output: {
        dir: staging,
        format: 'esm',
        // One file per package: no chunk shared between the two bundles.
        codeSplitting: false,
        banner: `// ${name} ${packageVersion(root, name)} (MIT licence), bundled into one file at build time for start-up (scripts/bundle-dependencies.mjs).`,
      },
    });
  }
  const made = readdirSync(staging).sort();
  const want = BUNDLED.map((n) => `${n}.js`).sort();
  if (made.join() !== want.join()) throw new Error(`expected ${want.join(', ')} in the bundle folder, got ${made.join(', ')}`);
  rmSync(vendor, { recursive: true, force: true });
  renameSync(staging, vendor);
}

/** Point every import of a bundled package in dist/ at its file in dist/vendor/. Returns the files changed. */
function rewriteImports(dist, vendor) {
  let changed = 0;
  for (const file of jsFiles(dist, vendor)) {
    const text = readFileSync(file, 'utf8');
    const next = text.replace(SPECIFIER, (_m, head, quote, name) => {
      let target = relative(dirname(file), join(vendor, `${name}.js`)).split(sep).join('/');
      if (!target.startsWith('.')) target = `./${target}`;
      return `${head}${quote}${target}${quote}`;
    });
    if (next !== text) {
      writeFileSync(file, next);
      changed++;
    }
  }
  return changed;
}

/**
 * Bundle and rewrite dist/ under `root`. Never throws: on failure dist/ keeps the package
 * imports (a working, slower program) and a warning goes to stderr.
 */
export async function bundleDependencies(root) {
  const dist = join(root, 'dist');
  const vendor = join(dist, 'vendor');
  try {
    mkdirSync(dist, { recursive: true });
    const { zodMembers } = await import('./zod-members.mjs');
    await writeBundles(root, vendor, await zodMembers(jsFiles(dist, vendor)));
  } catch (e) {
    process.stderr.write(`build: bundling ${BUNDLED.join(' and ')} for start-up failed (${e?.message ?? e}); dist/ imports the packages from node_modules (slower start-up)\n`);
    return { bundled: false, files: 0 };
  }
  return { bundled: true, files: rewriteImports(dist, vendor) };
}
