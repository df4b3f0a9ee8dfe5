/** Project file. Expected values are hand-counted from the fixture (the JSON each test writes). */
import { execFileSync } from 'node:child_process';
import { mkdirSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { CONFIG_FILE, readConfig } from '../../src/read/config.js';
import { FloorgapError } from '../../src/core/errors.js';
import { makeTempDir, removeTempDir } from '../helpers/table-variants.js';

let dir: string;
let empty: string;

beforeAll(() => {
  dir = makeTempDir();
  empty = makeTempDir();
});

afterAll(() => {
  removeTempDir(dir);
  removeTempDir(empty);
});

function thrown(f: () => unknown): FloorgapError {
  try {
    f();
  } catch (e) {
    expect(e).toBeInstanceOf(FloorgapError);
    return e as FloorgapError;
  }
  throw new Error('expected an error');
}

describe('readConfig', () => {
  it('reads floorgap.json from the working folder', () => {
    writeFileSync(join(dir, CONFIG_FILE), '{"label": "truth", "floor-table": "floors.csv", "by": ["station"]}');
    // expected: hand-copied from the JSON above
    expect(readConfig(null, dir)).toEqual({ label: 'truth', 'floor-table': 'floors.csv', by: ['station'] });
  });

  it('no default file: no options', () => {
    expect(readConfig(null, empty)).toEqual({});
  });

  it('an explicit file that does not exist names the path', () => {
    const path = join(empty, 'other.json');
    expect(thrown(() => readConfig(path, empty)).message).toBe(`${path}: cannot read the config file (ENOENT)`);
  });

  it('invalid JSON', () => {
    const path = join(dir, 'broken.json');
    writeFileSync(path, '{"label": ');
    const e = thrown(() => readConfig(path, dir));
    expect(e.message.startsWith(`${path}: not valid JSON (`)).toBe(true);
    expect(e.message.endsWith('); expected an object such as {"label": "truth"}')).toBe(true);
  });

  it('JSON that is not an object', () => {
    for (const text of ['[1, 2]', 'null', '"label"']) {
      const path = join(dir, 'not-object.json');
      writeFileSync(path, text);
      expect(thrown(() => readConfig(path, dir)).message).toBe(
        `${path}: expected a JSON object of option names and values, e.g. {"label": "truth"}`,
      );
    }
  });

  it('a folder or a named pipe as the file: an error naming it, never a wait for a writer', () => {
    const sub = join(dir, 'a-folder');
    mkdirSync(sub);
    expect(thrown(() => readConfig(sub, dir)).message).toBe(`${sub}: the config file is not a regular file (a folder)`);
    const pipeDir = makeTempDir();
    try {
      execFileSync('mkfifo', [join(pipeDir, CONFIG_FILE)]);
      expect(thrown(() => readConfig(null, pipeDir)).message).toBe(`${join(pipeDir, CONFIG_FILE)}: the config file is not a regular file (a pipe, a device or a socket)`);
    } finally {
      removeTempDir(pipeDir);
    }
  });

  it('keys: the allow-list, "where" only in a file named with --config', () => {
    const path = join(dir, 'where.json');
    writeFileSync(path, '{"where": "station <> \'S1\'", "max-bias": 0.05}');
    // expected: hand-copied from the JSON above
    expect(readConfig(path, dir)).toEqual({ where: "station <> 'S1'", 'max-bias': 0.05 });
    const found = makeTempDir();
    try {
      writeFileSync(join(found, CONFIG_FILE), '{"where": "TRUE"}');
      expect(thrown(() => readConfig(null, found)).message).toMatch(/floorgap\.json: "where" \(SQL text\) may not come from a project file found in the working folder/);
    } finally {
      removeTempDir(found);
    }
  });
});
