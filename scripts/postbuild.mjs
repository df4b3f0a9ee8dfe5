// Makes the built entry point executable so `floorgap` runs as a binary after `npm install`.
import { chmodSync, existsSync } from 'node:fs';
if (existsSync('dist/cli.js')) chmodSync('dist/cli.js', 0o755);
