/** Engine read errors in our words. Engine messages are copied from DuckDB 1.5 (@duckdb/node-api 1.5.6-r.1) as it printed them. */
import { writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { detectTable } from '../../src/read/table.js';
import { locateReadError, readError, readReason } from '../../src/read/read-errors.js';
import { makeTempDir, removeTempDir } from '../helpers/table-variants.js';

// printed by DuckDB 1.5 reading a CSV file with LF line ends and one CRLF line (first lines of the message)
const STATE_MACHINE =
  'Invalid Input Error: The CSV Parser state machine reached an invalid state.\nThis can happen when is not possible to parse your CSV File with the given options, or the CSV File is not RFC 4180 compliant \nPossible fixes:\n* Disable the parser\'s strict mode (strict_mode=false) to allow reading rows that do not comply with the CSV standard.\n\n  file = mixed.csv\n';

let dir: string;
beforeAll(() => {
  dir = makeTempDir();
});
afterAll(() => {
  if (dir) removeTempDir(dir);
});

describe('the CSV reader stopping without a line', () => {
  it('in our words when no line can be found', () => {
    expect(readReason(STATE_MACHINE)).toBe('a row the CSV reader cannot parse; expected RFC 4180 CSV (quotes doubled inside quoted fields, one kind of line end)');
    expect(readError('mixed.csv', new Error(STATE_MACHINE)).message).toBe(
      'mixed.csv: cannot read the table (a row the CSV reader cannot parse; expected RFC 4180 CSV (quotes doubled inside quoted fields, one kind of line end))',
    );
  });

  it('names the first line whose end differs, ignoring line breaks inside quotes', async () => {
    const path = join(dir, 'mixed.csv');
    // line 1 ends LF; line 2 holds a quoted CRLF (part of a value); line 4 ends CRLF
    writeFileSync(path, 'id,note,label\n1,"a\r\nb",x\n2,c,x\r\n3,d,x\n');
    const e = await locateReadError([await detectTable(path)], new Error(STATE_MACHINE));
    expect(e?.message).toBe(`${path}: line 4: ends with CRLF (\\r\\n) where line 1 ends with LF (\\n); expected one kind of line end throughout the file`);
    // another engine error: the line ends are not looked at
    expect(await locateReadError([await detectTable(path)], new Error('Invalid Input Error: something else'))).toBeNull();
  });
});
