/**
 * The stream the explorer hands to ink: ESC [ 3 J (erase the scrollback) never passes, everything else
 * does. The sequences are ECMA-48's ED (erase in display) with parameters 2 and 3 and CUP (cursor
 * position), as ansi-escapes' `clearTerminal` writes them: `ESC [2J ESC [3J ESC [H`.
 */
import { EventEmitter } from 'node:events';
import { describe, expect, it } from 'vitest';
import { withoutScrollbackClear } from '../../src/cli/commands/explore-terminal.js';

/** A terminal stand-in: records writes, has a size, emits resize. */
class FakeTerminal extends EventEmitter {
  written: (string | Uint8Array)[] = [];
  isTTY = true;
  columns = 80;
  rows = 24;
  write(chunk: string | Uint8Array, cb?: () => void): boolean {
    this.written.push(chunk);
    cb?.();
    return true;
  }
}

describe('withoutScrollbackClear', () => {
  it('drops ESC [ 3 J from strings and buffers and keeps every other byte', () => {
    const term = new FakeTerminal();
    const out = withoutScrollbackClear(term as unknown as NodeJS.WriteStream);
    out.write('\x1b[2J\x1b[3J\x1b[Hframe');
    out.write(Buffer.from('a\x1b[3Jb\x1b[3J'));
    out.write(Buffer.from('plain'));
    expect(term.written.map(String)).toEqual(['\x1b[2J\x1b[Hframe', 'ab', 'plain']);
  });

  it('passes the callback, the size, isTTY and resize events through', () => {
    const term = new FakeTerminal();
    const out = withoutScrollbackClear(term as unknown as NodeJS.WriteStream);
    let called = 0;
    out.write('x', () => called++);
    expect(called).toBe(1);
    expect([out.columns, out.rows, out.isTTY]).toEqual([80, 24, true]);
    let resized = 0;
    const onResize = () => resized++;
    out.on('resize', onResize);
    term.emit('resize');
    out.off('resize', onResize);
    term.emit('resize');
    expect(resized).toBe(1);
  });
});
