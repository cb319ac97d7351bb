#!/usr/bin/env node
// The `phosledger` command: `npm run build` compiles this to dist/src/cli/bin.js (package.json
// `bin` and `npm start`); src/cli/dev-bin.js runs the same file from the sources through tsx.
import { runCli } from './main.js';

// A reader that stops early (`phosledger plan summary 1 --json | head`) is not an error.
for (const stream of [process.stdout, process.stderr]) {
  stream.on('error', (err: NodeJS.ErrnoException) => {
    if (err.code === 'EPIPE') process.exit(process.exitCode ?? 0);
    throw err;
  });
}
const code = await runCli(process.argv.slice(2), {
  stdout: process.stdout,
  stderr: process.stderr,
  stdin: process.stdin,
  env: process.env,
});
if (code !== 0) process.exitCode = code;
