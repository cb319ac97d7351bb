#!/usr/bin/env node
// Runs the TypeScript sources directly (no build step), so `npx phosledger` works after `npm ci`.
import { register } from 'tsx/esm/api';

register();
// A reader that stops early (`phosledger plan summary 1 --json | head`) is not an error.
for (const stream of [process.stdout, process.stderr]) {
  stream.on('error', (err) => {
    if (err.code === 'EPIPE') process.exit(process.exitCode ?? 0);
    throw err;
  });
}
const { runCli } = await import('./main.ts');
const code = await runCli(process.argv.slice(2), {
  stdout: process.stdout,
  stderr: process.stderr,
  stdin: process.stdin,
  env: process.env,
});
if (code !== 0) process.exitCode = code;
