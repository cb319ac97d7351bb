#!/usr/bin/env node
// Runs the TypeScript sources directly (no build step), so `npx phosledger` works after `npm ci`.
import { register } from 'tsx/esm/api';

register();
const { runCli } = await import('./main.ts');
const code = await runCli(process.argv.slice(2), {
  stdout: process.stdout,
  stderr: process.stderr,
  stdin: process.stdin,
  env: process.env,
});
if (code !== 0) process.exitCode = code;
