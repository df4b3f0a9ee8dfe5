import { spawn } from 'node:child_process';
import { fileURLToPath } from 'node:url';

/** Path of the built binary (npm test builds it first). */
export const CLI = fileURLToPath(new URL('../../dist/cli.js', import.meta.url));
/** The repository root. */
export const ROOT = fileURLToPath(new URL('../..', import.meta.url));

export interface CliResult {
  readonly code: number | null;
  readonly stdout: string;
  readonly stderr: string;
}

/** Runs the built `floorgap` binary as a user would, with stdout and stderr captured (not a TTY). */
export function runCli(args: readonly string[], options: { cwd?: string; env?: Record<string, string> } = {}): Promise<CliResult> {
  return new Promise((resolve, reject) => {
    const child = spawn(process.execPath, [CLI, ...args], {
      cwd: options.cwd ?? ROOT,
      env: { ...process.env, NO_COLOR: '1', ...options.env },
      stdio: ['ignore', 'pipe', 'pipe'],
    });
    let stdout = '';
    let stderr = '';
    child.stdout.on('data', (d: Buffer) => (stdout += d.toString('utf8')));
    child.stderr.on('data', (d: Buffer) => (stderr += d.toString('utf8')));
    child.on('error', reject);
    child.on('close', (code) => resolve({ code, stdout, stderr }));
  });
}
