/**
 * Comments in src/, test/ and bench/, and the project's markdown documents, that name a file of this
 * repository name one that exists: after the layered re-layout several still pointed at io/, engine/
 * and util/ files that had moved. A name counts as a
 * file of the repository when it ends in .ts, .tsx or .mjs, or is a path (with a folder) ending in .md,
 * or in .js or .json under one of the repository's folders; a bare name (`load.ts`) is a file beside
 * the comment's own in src/ (any file of that name in tests and documents), a path is taken from the
 * repository root, from src/, from test/ or from the comment's folder.
 * Names of files a user writes (`floorgap.json`, `report.md`, `F.manifest.json`) are not paths here.
 */
import { existsSync, readdirSync, readFileSync, statSync } from 'node:fs';
import { dirname, join, relative } from 'node:path';
import ts from 'typescript';
import { describe, expect, it } from 'vitest';
import { ROOT } from '../helpers/run-cli.js';

const FOLDERS = ['src', 'test', 'bench', 'docs', 'scripts', 'data-samples'];

function walk(dir: string, names: RegExp): string[] {
  return readdirSync(dir).flatMap((n) => {
    const p = join(dir, n);
    return statSync(p).isDirectory() ? walk(p, names) : names.test(n) ? [p] : [];
  });
}

/** The markdown documents of the project (not those of node_modules or dist). */
function documents(): string[] {
  const top = ['README.md', 'DEVELOPERS.md'].map((n) => join(ROOT, n)).filter((p) => existsSync(p));
  return [...top, ...walk(join(ROOT, 'docs'), /\.md$/), ...walk(join(ROOT, 'test'), /\.md$/)];
}

/** The text of every comment in a source file (parsed, so `//` inside a string is no comment). */
function comments(file: string): string[] {
  const text = readFileSync(file, 'utf8');
  const sf = ts.createSourceFile(file, text, ts.ScriptTarget.Latest, true, file.endsWith('x') ? ts.ScriptKind.TSX : ts.ScriptKind.TS);
  const seen = new Set<number>();
  const out: string[] = [];
  const add = (ranges: ts.CommentRange[] | undefined) => {
    for (const r of ranges ?? []) {
      if (seen.has(r.pos)) continue;
      seen.add(r.pos);
      out.push(text.slice(r.pos, r.end));
    }
  };
  const visit = (n: ts.Node): void => {
    add(ts.getLeadingCommentRanges(text, n.getFullStart()));
    add(ts.getTrailingCommentRanges(text, n.getEnd()));
    n.forEachChild(visit);
  };
  visit(sf);
  return out;
}

/** Whether a name in a comment is meant as a file of this repository. */
function isRepoPath(name: string): boolean {
  if (/\.(tsx?|mjs)$/.test(name)) return true;
  if (!name.includes('/')) return false;
  if (name.endsWith('.md')) return true;
  return FOLDERS.includes(name.split('/')[0]) || existsSync(join(ROOT, 'src', name.split('/')[0]));
}

/** Every file name of src/, test/ and bench/ (a bare name in a test or a document may mean any of them). */
const BASENAMES = new Set(['src', 'test', 'bench'].flatMap((f) => walk(join(ROOT, f), /./).map((p) => p.split('/').pop()!)));

/** Files floorgap's own tools write (not kept in the repository). */
const WRITTEN = ['bench/results/'];

function exists(file: string, name: string, strict = true): boolean {
  if (WRITTEN.some((w) => name.startsWith(w))) return true;
  if (!strict && !name.includes('/') && BASENAMES.has(name)) return true;
  const bases = name.includes('/') ? [ROOT, join(ROOT, 'src'), join(ROOT, 'test'), dirname(file)] : [dirname(file)];
  return bases.some((b) => {
    const p = join(b, name);
    return existsSync(p) || existsSync(p.replace(/\.js$/, '.ts')) || existsSync(p.replace(/\.js$/, '.tsx'));
  });
}

const NAME = /(?<![\w/.:-])((?:[\w.-]+\/)*[\w-]+(?:\.[\w-]+)*\.(?:tsx?|m?js|md|json))\b/g;

/** `file: name` for every file named in the given texts of a file that does not exist. */
function missingIn(file: string, texts: readonly string[], strict: boolean): string[] {
  const out: string[] = [];
  for (const c of texts) {
    for (const m of c.matchAll(NAME)) {
      if (isRepoPath(m[1]) && !exists(file, m[1], strict)) out.push(`${relative(ROOT, file)}: ${m[1]}`);
    }
  }
  return out;
}

/**
 * Missing names in the comments of a folder's sources. In src/ a bare name is a file beside the
 * comment's own; in tests and documents it may be any file of the repository of that name.
 */
function missingPaths(folder: string): string[] {
  const files = walk(join(ROOT, folder), /\.tsx?$/).filter((f) => !relative(ROOT, f).startsWith('test/fixtures/'));
  return files.flatMap((f) => missingIn(f, comments(f), folder === 'src'));
}

describe('comments and documents', () => {
  it('comments in src/ name only files that exist', () => {
    expect(missingPaths('src')).toEqual([]);
  });

  it('comments in test/ and bench/ name only files that exist', () => {
    expect([...missingPaths('test'), ...missingPaths('bench')]).toEqual([]);
  });

  it('the README, DEVELOPERS.md and docs/ name only files that exist', () => {
    expect(documents().flatMap((f) => missingIn(f, [readFileSync(f, 'utf8')], false))).toEqual([]);
  });

  it('the check sees a moved file, and leaves names of files a user writes alone', () => {
    expect(isRepoPath('util/unsafe-chars.ts')).toBe(true);
    expect(exists(join(ROOT, 'src/sql/dialect.ts'), 'util/unsafe-chars.ts')).toBe(false);
    expect(exists(join(ROOT, 'src/sql/dialect.ts'), 'core/unsafe-chars.ts')).toBe(true);
    expect(exists(join(ROOT, 'src/cells/load.ts'), 'profile.ts')).toBe(true);
    expect(isRepoPath('floorgap.json')).toBe(false);
    expect(isRepoPath('report.md')).toBe(false);
    expect(isRepoPath('cwd/floorgap.json')).toBe(false);
  });
});
