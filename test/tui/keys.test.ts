/**
 * splitKeys: one read from the terminal → the keys it holds. Expected flags are those ink 6.8's
 * parse-keypress gives each key read alone (DEL → delete, BS → backspace, CR → return, HT → tab,
 * other C0 controls → ctrl + the letter 0x60 above them).
 */
import { describe, expect, it } from 'vitest';
import { splitKeys } from '../../src/tui/keys.js';

describe('splitKeys', () => {
  it('splits a run of Backspaces and text into its keys, in order', () => {
    expect(splitKeys('\x7f\x7f\x7f', {})).toEqual([
      { input: '', key: { delete: true } },
      { input: '', key: { delete: true } },
      { input: '', key: { delete: true } },
    ]);
    expect(splitKeys('aB\b\r\t', {})).toEqual([
      { input: 'a', key: {} },
      { input: 'B', key: { shift: true } },
      { input: '', key: { backspace: true } },
      { input: '\r', key: { return: true } },
      { input: '\t', key: { tab: true } },
    ]);
  });

  it('reads C0 controls as Ctrl + a letter: 0x03 is Ctrl-C', () => {
    expect(splitKeys('j\x03', {})).toEqual([
      { input: 'j', key: {} },
      { input: 'c', key: { ctrl: true } },
    ]);
  });

  it('keeps a character outside the BMP whole', () => {
    expect(splitKeys('a😀', {}).map((k) => k.input)).toEqual(['a', '😀']);
  });

  it('returns a single key, an escape sequence or a key ink flagged as it is', () => {
    expect(splitKeys('q', {})).toEqual([{ input: 'q', key: {} }]);
    expect(splitKeys('', { delete: true })).toEqual([{ input: '', key: { delete: true } }]);
    expect(splitKeys('[A', { upArrow: true, meta: true })).toEqual([{ input: '[A', key: { upArrow: true, meta: true } }]);
    expect(splitKeys('\x1b[A', {})).toEqual([{ input: '\x1b[A', key: {} }]);
  });
});
