import { Writable } from 'node:stream';
import { main } from '../../src/cli/index.js';

/** A writable that keeps what is written, with an optional isTTY flag. */
export class Captured extends Writable {
  text = '';
  isTTY?: boolean;
  columns?: number;
  constructor(tty = false) {
    super();
    if (tty) {
      this.isTTY = true;
      this.columns = 100;
    }
  }
  override _write(chunk: Buffer | string, _enc: BufferEncoding, done: (e?: Error | null) => void): void {
    this.text += chunk.toString();
    done();
  }
}

/**
 * Runs floorgap's CLI in this process (no build needed), with stdout and stderr captured.
 * @param env environment the command sees (the cache folder, NO_COLOR, …)
 */
export async function runMain(argv: readonly string[], env: Record<string, string | undefined> = {}): Promise<{ code: number; stdout: string; stderr: string }> {
  const stdout = new Captured();
  const stderr = new Captured();
  const code = await main(argv, { stdout, stderr, env: { ...process.env, NO_COLOR: '1', ...env }, cwd: process.cwd() });
  return { code, stdout: stdout.text, stderr: stderr.text };
}
