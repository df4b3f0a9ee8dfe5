#!/usr/bin/env node
// React (under the explorer) picks its production build from NODE_ENV when it is first loaded: the
// development build profiles every render and is several times slower. So set it before loading.
process.env.NODE_ENV ??= 'production';
const { main } = await import('./cli/index.js');
const { reportFailure } = await import('./cli/failure.js');
const { installSignalHandlers } = await import('./cli/signals.js');
const { stdoutError } = await import('./cli/io.js');
installSignalHandlers(process.stderr);

const io = { stdout: process.stdout, stderr: process.stderr, stdin: process.stdin, env: process.env, cwd: process.cwd() };

// a reader that stops early (`floorgap report … | head`) closes the pipe: that is not an error. Any
// other failed write on stdout (a full disk, a device that refuses it) ends the command with one line
// and exit 2, as an output floorgap cannot write does; on stderr nothing more can be said.
process.stdout.on('error', (e: NodeJS.ErrnoException) => {
  if (e.code === 'EPIPE') process.exit(process.exitCode ?? 0);
  process.exit(reportFailure(stdoutError(e), io));
});
process.stderr.on('error', (e: NodeJS.ErrnoException) => {
  process.exit(e.code === 'EPIPE' ? (process.exitCode ?? 0) : 2);
});

main(process.argv.slice(2), io).then(
  (code) => {
    process.exitCode = code;
  },
  (e: unknown) => {
    process.exitCode = reportFailure(e, io);
  },
);
