/** Project file. Expected values are hand-counted from the fixture (the JSON each test writes). */
import { writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { CONFIG_FILE, readConfig } from '../../src/io/config.js';
import { FloorgapError } from '../../src/util/error.js';
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
});
