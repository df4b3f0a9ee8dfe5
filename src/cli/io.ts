/** The process-facing surface a command uses; `cli/index.ts` fills it from `process`. */
export interface CliIO {
  readonly stdout: NodeJS.WritableStream & { isTTY?: boolean; columns?: number };
  readonly stderr: NodeJS.WritableStream & { isTTY?: boolean };
  /** the keyboard, for the explorer (absent in tests that only print) */
  readonly stdin?: NodeJS.ReadStream;
  readonly env: Readonly<Record<string, string | undefined>>;
  readonly cwd: string;
}

/** Colour only on a terminal, and never when NO_COLOR is set (https://no-color.org). */
export function useColor(io: CliIO): boolean {
  return Boolean(io.stdout.isTTY) && !('NO_COLOR' in io.env && io.env.NO_COLOR !== '');
}

export function writeOut(io: CliIO, text: string): Promise<void> {
  return new Promise((resolve, reject) => {
    io.stdout.write(text, (e) => (e ? reject(e) : resolve()));
  });
}
