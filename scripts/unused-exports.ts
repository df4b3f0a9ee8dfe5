/**
 * Lists the exported names of src/ that no other file of src/, test/ or bench/ imports (values and
 * types alike). Run it with `npx tsx scripts/unused-exports.ts`; `test/lint/unused-exports.test.ts`
 * holds src/ to it. An export used only inside its own file is listed too (`local: true`): its
 * `export` can go, the declaration stays.
 *
 * Counted as a use: a named, default or namespace import, a re-export (`export { x } from`,
 * `export * from`), `import('…').Name` in a type, and `await import('…')` (destructured names, or every
 * export when the module object is kept whole).
 */
import { readdirSync, readFileSync, statSync } from 'node:fs';
import { dirname, join, relative, resolve } from 'node:path';
import { fileURLToPath } from 'node:url';
import ts from 'typescript';

export interface UnusedExport {
  /** the file, relative to the repository root */
  readonly file: string;
  readonly name: string;
  /** a type (interface, type alias) or a value (function, constant, class, enum) */
  readonly kind: 'type' | 'value';
  /** the name is used inside its own file */
  readonly local: boolean;
}

const ROOT = resolve(dirname(fileURLToPath(import.meta.url)), '..');

function walk(dir: string): string[] {
  return readdirSync(dir).flatMap((n) => {
    const p = join(dir, n);
    if (n === 'node_modules' || n === 'fixtures') return [];
    return statSync(p).isDirectory() ? walk(p) : /\.(ts|tsx|mts)$/.test(n) && !n.endsWith('.d.ts') ? [p] : [];
  });
}

/** The file a relative module specifier names (`./x.js` → `./x.ts` or `./x.tsx`), or null. */
function target(from: string, spec: string, known: ReadonlySet<string>): string | null {
  if (!spec.startsWith('.')) return null;
  const base = resolve(dirname(from), spec);
  for (const c of [base, base.replace(/\.js$/, '.ts'), base.replace(/\.js$/, '.tsx'), `${base}.ts`, `${base}.tsx`]) if (known.has(c)) return c;
  return null;
}

function exportedNames(sf: ts.SourceFile): { name: string; kind: 'type' | 'value' }[] {
  const out: { name: string; kind: 'type' | 'value' }[] = [];
  const types = new Set(sf.statements.flatMap((s) => ((ts.isInterfaceDeclaration(s) || ts.isTypeAliasDeclaration(s)) ? [s.name.text] : [])));
  const push = (name: string) => out.push({ name, kind: types.has(name) ? 'type' : 'value' });
  const exported = (n: ts.Node) => ts.canHaveModifiers(n) && (ts.getModifiers(n) ?? []).some((m) => m.kind === ts.SyntaxKind.ExportKeyword);
  for (const s of sf.statements) {
    if (ts.isExportDeclaration(s) && !s.moduleSpecifier && s.exportClause && ts.isNamedExports(s.exportClause)) {
      for (const e of s.exportClause.elements) push(e.name.text);
    } else if (ts.isExportAssignment(s)) push('default');
    else if (exported(s)) {
      const isDefault = (ts.getModifiers(s as ts.HasModifiers) ?? []).some((m) => m.kind === ts.SyntaxKind.DefaultKeyword);
      if (isDefault) push('default');
      else if (ts.isVariableStatement(s)) {
        for (const d of s.declarationList.declarations) if (ts.isIdentifier(d.name)) push(d.name.text);
      } else if ((ts.isFunctionDeclaration(s) || ts.isClassDeclaration(s) || ts.isInterfaceDeclaration(s) || ts.isTypeAliasDeclaration(s) || ts.isEnumDeclaration(s)) && s.name) {
        push(s.name.text);
      }
    }
  }
  return out;
}

/** Names a file uses from each other file: a set of names, or 'all'. */
function importsOf(sf: ts.SourceFile, file: string, known: ReadonlySet<string>, add: (to: string, name: string | 'all') => void): void {
  const visit = (n: ts.Node): void => {
    if ((ts.isImportDeclaration(n) || ts.isExportDeclaration(n)) && n.moduleSpecifier && ts.isStringLiteral(n.moduleSpecifier)) {
      const to = target(file, n.moduleSpecifier.text, known);
      if (to) {
        if (ts.isImportDeclaration(n)) {
          const clause = n.importClause;
          if (clause?.name) add(to, 'default');
          const nb = clause?.namedBindings;
          if (nb && ts.isNamespaceImport(nb)) add(to, 'all');
          else if (nb) for (const e of nb.elements) add(to, (e.propertyName ?? e.name).text);
        } else if (!n.exportClause || ts.isNamespaceExport(n.exportClause)) add(to, 'all');
        else for (const e of n.exportClause.elements) add(to, (e.propertyName ?? e.name).text);
      }
    } else if (ts.isImportTypeNode(n) && ts.isLiteralTypeNode(n.argument) && ts.isStringLiteral(n.argument.literal)) {
      const to = target(file, n.argument.literal.text, known);
      if (to) {
        if (n.qualifier) add(to, ts.isIdentifier(n.qualifier) ? n.qualifier.text : n.qualifier.left.getText(sf));
        else add(to, 'all');
      }
    } else if (ts.isCallExpression(n) && n.expression.kind === ts.SyntaxKind.ImportKeyword && n.arguments[0] && ts.isStringLiteral(n.arguments[0])) {
      const to = target(file, n.arguments[0].text, known);
      if (to) {
        let p: ts.Node = n.parent;
        if (ts.isAwaitExpression(p)) p = p.parent;
        if (ts.isVariableDeclaration(p) && ts.isObjectBindingPattern(p.name)) {
          for (const e of p.name.elements) add(to, (e.propertyName && ts.isIdentifier(e.propertyName) ? e.propertyName : (e.name as ts.Identifier)).text);
        } else add(to, 'all');
      }
    }
    ts.forEachChild(n, visit);
  };
  visit(sf);
}

function usedLocally(sf: ts.SourceFile, name: string): boolean {
  let count = 0;
  const visit = (n: ts.Node): void => {
    if (ts.isIdentifier(n) && n.text === name) count++;
    ts.forEachChild(n, visit);
  };
  visit(sf);
  // the declaration's own name is one occurrence; `export { x }` another
  return count > 1;
}

/**
 * Every export of src/ that no other file imports, in file order.
 * @param root the repository (default: this one)
 */
export function unusedExports(root = ROOT): UnusedExport[] {
  const files = ['src', 'test', 'bench'].flatMap((d) => walk(join(root, d)));
  const known = new Set(files);
  const parsed = new Map(files.map((f) => [f, ts.createSourceFile(f, readFileSync(f, 'utf8'), ts.ScriptTarget.Latest, true, f.endsWith('x') ? ts.ScriptKind.TSX : ts.ScriptKind.TS)]));
  const used = new Map<string, Set<string> | 'all'>();
  for (const [file, sf] of parsed) {
    importsOf(sf, file, known, (to, name) => {
      if (to === file) return;
      const cur = used.get(to);
      if (name === 'all' || cur === 'all') used.set(to, 'all');
      else used.set(to, (cur ?? new Set<string>()).add(name));
    });
  }
  const out: UnusedExport[] = [];
  for (const [file, sf] of parsed) {
    if (!file.startsWith(join(root, 'src') + '/')) continue;
    const u = used.get(file);
    if (u === 'all') continue;
    for (const { name, kind } of exportedNames(sf)) {
      if (u?.has(name)) continue;
      out.push({ file: relative(root, file), name, kind, local: name !== 'default' && usedLocally(sf, name) });
    }
  }
  return out;
}

if (process.argv[1] && resolve(process.argv[1]) === fileURLToPath(import.meta.url)) {
  for (const u of unusedExports()) console.log(`${u.file}: ${u.kind} ${u.name}${u.local ? ' (used in its own file)' : ''}`);
}
