/**
 * The browser tests' server, in a process of its own so the browser driver's traffic does not
 * share the server's event loop (as in a clinic, where the browser runs elsewhere). Opens the
 * database file named on the command line, creates the test account (an admin, so it can also
 * upload a food table), listens on 127.0.0.1 and
 * prints `READY <address>`. Ends when its standard input closes or on SIGTERM.
 */
import { TEST_SCRYPT_PARAMS } from '../../src/auth/password.js';
import { fixedClock } from '../../src/clock.js';
import { openDb } from '../../src/db/database.js';
import { buildApp } from '../../src/server/app.js';

const [file, username, password] = process.argv.slice(2);
if (!file || !username || !password)
  throw new Error('usage: server-process <db> <user> <password>');
const db = openDb(file);
const app = await buildApp({
  db,
  clock: fixedClock('2026-03-05T09:30:00Z'), // invented fixed test time
  auth: { scryptParams: TEST_SCRYPT_PARAMS },
});
await app.ready();
// An admin: the screens a dietitian uses, plus the Food tables upload, which is admin-only.
await app.auth.createUser(username, 'admin', password);
const address = await app.listen({ host: '127.0.0.1', port: 0 });

let closing = false;
const stop = async () => {
  if (closing) return;
  closing = true;
  await app.close();
  await db.close();
  process.exit(0);
};
process.on('SIGTERM', () => void stop());
process.stdin.on('end', () => void stop());
process.stdin.resume();
process.stdout.write(`READY ${address}\n`);
