#!/usr/bin/env node
import { main } from './cli/index.js';

const io = { stdout: process.stdout, stderr: process.stderr, stdin: process.stdin, env: process.env, cwd: process.cwd() };
main(process.argv.slice(2), io).then(
  (code) => {
    process.exitCode = code;
  },
  (e: unknown) => {
    process.stderr.write(`floorgap: internal error: ${e instanceof Error ? e.message : String(e)}\n`);
    process.exitCode = 3;
  },
);
