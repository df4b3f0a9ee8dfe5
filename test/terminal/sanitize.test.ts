import { describe, expect, it } from 'vitest';
import { sanitize } from '../../src/terminal/sanitize.js';
import { displayWidth, pad, truncate } from '../../src/terminal/width.js';

describe('sanitize', () => {
  it('turns a clear-screen CSI sequence into a visible escape', () => {
    expect(sanitize('S5\x1b[2J')).toBe('S5\\x1b[2J');
  });

  it('turns an OSC 52 clipboard write into visible escapes (ESC and BEL)', () => {
    const out = sanitize('\x1b]52;c;ZXZpbA==\x07');
    expect(out).toBe('\\x1b]52;c;ZXZpbA==\\x07');
    expect(out).not.toMatch(/[\x00-\x1f\x7f]/);
  });

  it('turns the right-to-left override into \\u202e', () => {
    expect(sanitize('invoice\u202Efdp.exe')).toBe('invoice\\u202efdp.exe');
  });

  it('escapes every bidi mark, embedding, override and isolate', () => {
    const bidi = [0x061c, 0x200e, 0x200f, 0x202a, 0x202b, 0x202c, 0x202d, 0x202e, 0x2066, 0x2067, 0x2068, 0x2069];
    for (const code of bidi) {
      const out = sanitize(`a${String.fromCharCode(code)}b`);
      expect(out).toBe(`a\\u${code.toString(16).padStart(4, '0')}b`);
    }
  });

  it('escapes tab, newline and carriage return by name, other C0, DEL and C1 as \\xNN', () => {
    expect(sanitize('a\tb\nc\rd')).toBe('a\\tb\\nc\\rd');
    expect(sanitize('\x00\x08\x7f')).toBe('\\x00\\x08\\x7f');
    expect(sanitize('\u009b31m\u0085')).toBe('\\x9b31m\\x85');
  });

  it('keeps tab, LF and CR when asked, still escaping ESC', () => {
    expect(sanitize('a\tb\r\nc\x1b', { keepWhitespace: true })).toBe('a\tb\r\nc\\x1b');
  });

  it('leaves printable text alone, including non-ASCII and astral characters', () => {
    const text = 'station=S5 · lighting=dôme 検査 😀';
    expect(sanitize(text)).toBe(text);
  });

  it('escapes a lone surrogate', () => {
    expect(sanitize('a\ud800b')).toBe('a\\ud800b');
  });
});

describe('displayWidth', () => {
  it('counts code points, wide East Asian characters as two, combining marks as zero', () => {
    expect(displayWidth('dome')).toBe(4);
    expect(displayWidth('検査')).toBe(4);
    expect(displayWidth('ｄ')).toBe(2); // fullwidth latin
    expect(displayWidth('e\u0301')).toBe(1);
    expect(displayWidth('😀')).toBe(2);
    expect(displayWidth('·…—')).toBe(3);
  });
});

describe('truncate', () => {
  it('returns the string when it fits', () => {
    expect(truncate('S5 · dome', 9)).toBe('S5 · dome');
  });

  it('cuts with an ellipsis to exactly the width', () => {
    const out = truncate('station=S5 · lighting=dome', 12);
    expect(out).toBe('station=S5 …');
    expect(displayWidth(out)).toBe(12);
  });

  it('never splits a wide character across the limit', () => {
    const out = truncate('検査検査', 4);
    expect(out).toBe('検…');
    expect(displayWidth(out)).toBe(3);
  });

  it('handles tiny widths', () => {
    expect(truncate('abc', 1)).toBe('…');
    expect(truncate('abc', 0)).toBe('');
  });

  it('pad fills to the exact width on either side', () => {
    expect(pad('7.0', 5, 'right')).toBe('  7.0');
    expect(pad('検', 3)).toBe('検 ');
    expect(pad('abcdef', 4)).toBe('abc…');
  });
});
