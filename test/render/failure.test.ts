/**
 * failureText: the one line every command (and the explorer) prints for a failure. Expected strings
 * follow the definition in src/render/failure.ts and the sanitiser's escapes (src/terminal/sanitize.ts:
 * ESC → `\x1b`); messages are invented.
 */
import { describe, expect, it } from 'vitest';
import { failureText } from '../../src/render/failure.js';
import { error } from '../../src/core/errors.js';

describe('failureText', () => {
  it('prints a FloorgapError as its message, sanitised, in one line', () => {
    expect(failureText(error('preds\x1b[2J.csv: line 3: expected 7 fields'), true)).toBe('floorgap: preds\\x1b[2J.csv: line 3: expected 7 fields\n');
  });

  it('prints anything else as an internal error: the first line of its message, sanitised', () => {
    expect(failureText(new TypeError('x\x1b]52;c;aGk=\x07 is undefined\nmore'), false)).toBe('floorgap: internal error: x\\x1b]52;c;aGk=\\x07 is undefined\n');
    expect(failureText('a thrown string', false)).toBe('floorgap: internal error: a thrown string\n');
  });

  it('adds the stack of an internal error when debugging, each line sanitised, line breaks kept', () => {
    const e = new Error('boom');
    e.stack = 'Error: boom\n    at f (a\x1b.js:1:2)\n    at g (b.js:3:4)';
    expect(failureText(e, true)).toBe('floorgap: internal error: boom\nError: boom\n    at f (a\\x1b.js:1:2)\n    at g (b.js:3:4)\n');
    expect(failureText(e, false)).toBe('floorgap: internal error: boom\n');
    expect(failureText(error('bad input'), true)).toBe('floorgap: bad input\n'); // no stack for user errors
  });
});
