/**
 * The build's compile step: every src/**\/*.ts file into dist/ as JavaScript with its source
 * map, one file at a time, without type checking (TypeScript's own transpileModule, with the
 * compiler options of tsconfig.json).
 *
 * Why not `tsc`: type checking the whole program takes about 27 s of one core here, and the
 * set-up of `make test` and `make demo` ran it alone before anything else could start. The
 * type check is not dropped: it is `npm run typecheck`, and the test suite runs it as one of its
 * files (tests/architecture/typecheck.test.ts), beside the others. tsconfig.json sets
 * `isolatedModules`, so tsc itself refuses any construct a file-at-a-time compile would get
 * wrong (a type re-exported as a value, a const enum); what is written here is then what tsc
 * would write.
 */
import { mkdirSync, readdirSync, readFileSync, writeFileSync } from 'node:fs';
import { createRequire } from 'node:module';
import { dirname, join, relative } from 'node:path';

function tsSources(dir) {
  const out = [];
  for (const entry of readdirSync(dir, { withFileTypes: true })) {
    const path = join(dir, entry.name);
    if (entry.isDirectory()) out.push(...tsSources(path));
    else if (entry.name.endsWith('.ts') && !entry.name.endsWith('.d.ts')) out.push(path);
  }
  return out;
}

/** Compiles root/src into dist (root/dist by default); returns the number of files written. */
export function transpileSources(root, dist = join(root, 'dist')) {
  const ts = createRequire(join(root, 'package.json'))('typescript');
  const configPath = join(root, 'tsconfig.json');
  const read = ts.readConfigFile(configPath, ts.sys.readFile);
  if (read.error) throw new Error(ts.flattenDiagnosticMessageText(read.error.messageText, '\n'));
  const { options } = ts.parseJsonConfigFileContent(read.config, ts.sys, root, undefined, configPath);
  // A file alone cannot tell NodeNext that it is an ES module (that comes from package.json's
  // "type"), so the module kind is stated: ES module syntax, import paths kept as written,
  // which is what tsc writes for these files under NodeNext.
  options.module = ts.ModuleKind.ESNext;
  options.moduleResolution = ts.ModuleResolutionKind.Bundler;
  // Under NodeNext every file of this package is a module, also one with no import or export.
  options.moduleDetection = ts.ModuleDetectionKind.Force;
  const src = join(root, 'src');
  const files = tsSources(src);
  for (const file of files) {
    const rel = relative(src, file).replace(/\.ts$/, '.js');
    const out = join(dist, rel);
    const result = ts.transpileModule(readFileSync(file, 'utf8'), { compilerOptions: options, fileName: file, reportDiagnostics: true });
    const errors = (result.diagnostics ?? []).filter((d) => d.category === ts.DiagnosticCategory.Error);
    if (errors.length) {
      throw new Error(`${relative(root, file)}: ${errors.map((d) => ts.flattenDiagnosticMessageText(d.messageText, '\n')).join('; ')}`);
    }
    mkdirSync(dirname(out), { recursive: true });
    writeFileSync(out, result.outputText);
    if (result.sourceMapText) writeFileSync(`${out}.map`, result.sourceMapText);
  }
  return files.length;
}
