/**
 * Which of zod's exports the built program uses, read from the syntax of dist/ (TypeScript's
 * parser on the compiled JavaScript, so type-only uses are already gone): the members of `z`
 * (`z.object`, `z.ZodError`, …) and any other name imported from 'zod'. The start-up bundle
 * (bundle-dependencies.mjs) keeps only those and what they need.
 *
 * The scan accepts only uses it can read: `import { z } from 'zod'` (also renamed, and other
 * named imports) with `z` always followed by `.member`. Anything else (a namespace or default
 * import, a dynamic import of zod, `z` passed around or indexed, another binding named `z` in
 * the same file) throws, and the build then keeps the package imports: a member missed here
 * would be a run-time error, so the scan never guesses.
 */
import { readFileSync } from 'node:fs';
import ts from 'typescript';

function fail(file, node, what) {
  const { line } = node.getSourceFile().getLineAndCharacterOfPosition(node.getStart());
  throw new Error(`${file}:${line + 1}: ${what}; the start-up bundle of zod reads only \`import { z } from 'zod'\` with z.member uses`);
}

// 'zod', or the bundle's path once a previous build has rewritten the imports (a second run on the same dist/).
const isZod = (node) => ts.isStringLiteral(node) && (node.text === 'zod' || /^\.{1,2}\/(.*\/)?vendor\/zod\.js$/.test(node.text));

/** The zod names one compiled file uses: `members` of z, `named` other imports. */
function scanFile(file, members, named) {
  const text = readFileSync(file, 'utf8');
  if (!/['"](zod|[./]+(.*\/)?vendor\/zod\.js)['"]/.test(text)) return;
  const source = ts.createSourceFile(file, text, ts.ScriptTarget.Latest, true, ts.ScriptKind.JS);
  const locals = new Set();
  for (const statement of source.statements) {
    if (ts.isExportDeclaration(statement) && statement.moduleSpecifier && isZod(statement.moduleSpecifier)) fail(file, statement, 're-export from zod');
    if (!ts.isImportDeclaration(statement) || !isZod(statement.moduleSpecifier)) continue;
    const clause = statement.importClause;
    if (!clause || clause.name || !clause.namedBindings || !ts.isNamedImports(clause.namedBindings)) fail(file, statement, 'an import of zod other than named imports');
    for (const spec of clause.namedBindings.elements) {
      const imported = (spec.propertyName ?? spec.name).text;
      if (imported === 'z') locals.add(spec.name.text);
      else named.add(imported);
    }
  }
  const visit = (node) => {
    if (ts.isCallExpression(node) && node.expression.kind === ts.SyntaxKind.ImportKeyword && node.arguments.some(isZod)) fail(file, node, 'a dynamic import of zod');
    if (ts.isIdentifier(node) && locals.has(node.text)) {
      const parent = node.parent;
      const declaresZ = ts.isImportSpecifier(parent);
      const memberName = ts.isPropertyAccessExpression(parent) && parent.name === node;
      const key = (ts.isPropertyAssignment(parent) || ts.isMethodDeclaration(parent) || ts.isPropertyDeclaration(parent)) && parent.name === node;
      if (ts.isPropertyAccessExpression(parent) && parent.expression === node) members.add(parent.name.text);
      else if (!declaresZ && !memberName && !key) fail(file, node, `\`${node.text}\` used other than as ${node.text}.member (or another binding of that name)`);
    }
    ts.forEachChild(node, visit);
  };
  visit(source);
}

/** Every zod name the files use, checked against what zod exports. */
export async function zodMembers(files) {
  const members = new Set();
  const named = new Set();
  for (const file of files) scanFile(file, members, named);
  if (members.size === 0 && named.size === 0) throw new Error('no import of zod found in dist/');
  const zod = await import('zod');
  for (const name of members) if (!Object.hasOwn(zod.z, name)) throw new Error(`dist uses z.${name}, which zod does not have`);
  for (const name of named) if (!Object.hasOwn(zod, name)) throw new Error(`dist imports "${name}" from zod, which zod does not export`);
  return { members: [...members].sort(), named: [...named].sort() };
}
