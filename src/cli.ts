#!/usr/bin/env node
// React (under the explorer) picks its production build from NODE_ENV when it is first loaded: the
// development build profiles every render and is several times slower. So set it before loading.
process.env.NODE_ENV ??= 'production';
const { main } = await import('./cli/index.js');
const { reportFailure } = await import('./cli/failure.js');
const { installSignalHandlers } = await import('./cli/signals.js');
installSignalHandlers(process.stderr);

// a reader that stops early (`floorgap report … | head`) closes the pipe: that is not an error
for (const stream of [process.stdout, process.stderr]) {
  stream.on('error', (e: NodeJS.ErrnoException) => {
    if (e.code === 'EPIPE') process.exit(process.exitCode ?? 0);
    throw e;
  });
}

const io = { stdout: process.stdout, stderr: process.stderr, stdin: process.stdin, env: process.env, cwd: process.cwd() };
main(process.argv.slice(2), io).then(
  (code) => {
    process.exitCode = code;
  },
  (e: unknown) => {
    process.exitCode = reportFailure(e, io);
  },
);
