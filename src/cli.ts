#!/usr/bin/env node
// React (under the explorer) picks its production build from NODE_ENV when it is first loaded: the
// development build profiles every render and is several times slower. So set it before loading.
process.env.NODE_ENV ??= 'production';
const { main } = await import('./cli/index.js');
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
    // main() catches everything it can; this is the last guard, so it escapes controls by itself
    const msg = (e instanceof Error ? e.message : String(e)).split('\n')[0].replace(/[\x00-\x1f\x7f-\x9f\u061c\u200e\u200f\u2028\u2029\u202a-\u202e\u2066-\u2069]/g, '?');
    process.stderr.write(`floorgap: internal error: ${msg}\n`);
    process.exitCode = 3;
  },
);
