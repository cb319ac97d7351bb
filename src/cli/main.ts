import { parseArgs } from 'node:util';
import { loadConfig, type Config } from '../config.js';
import type { Db } from '../db/database.js';
import { UsageError, type Command, type CommandContext } from './command.js';
import { loadCommandsFor } from './commands/index.js';
import { commandSummaries, type CommandSummary } from './manifest.js';

function usageLine(c: CommandSummary): string {
  return `phosledger ${c.path.join(' ')}${c.usage ? ` ${c.usage}` : ''}`;
}

async function helpText(): Promise<string> {
  const lines = (await commandSummaries()).map((c) => `  ${usageLine(c)}\n      ${c.summary}`);
  return [
    'phosledger: dietary phosphate load planner (estimates only; the care team decides)',
    '',
    'usage:',
    ...lines,
    '',
    'global options: --db <file> (or PHOSLEDGER_DB), --help',
    '',
  ].join('\n');
}

/** Finds the command whose words match the longest prefix of argv (loading only its module). */
async function findCommand(argv: string[]): Promise<Command | undefined> {
  let best: Command | undefined;
  for (const c of await loadCommandsFor(argv[0] ?? '')) {
    if (c.path.every((w, i) => argv[i] === w) && (!best || c.path.length > best.path.length))
      best = c;
  }
  return best;
}

export interface RunIo {
  stdout: NodeJS.WritableStream;
  stderr: NodeJS.WritableStream;
  stdin: NodeJS.ReadableStream;
  env: NodeJS.ProcessEnv;
}

/** Runs one CLI invocation and returns its exit code (0 ok, 1 failure, 2 usage). */
export async function runCli(argv: string[], io: RunIo): Promise<number> {
  if (argv.length === 0 || argv[0] === '--help' || argv[0] === 'help' || argv[0] === '-h') {
    io.stdout.write(await helpText());
    return argv.length === 0 ? 2 : 0;
  }
  const command = await findCommand(argv);
  if (!command) {
    io.stderr.write(
      `phosledger: unknown command '${argv.slice(0, 2).join(' ')}'\n\n${await helpText()}`,
    );
    return 2;
  }
  let db: Db | undefined;
  try {
    const rest = argv.slice(command.path.length);
    if (rest.includes('--help') || rest.includes('-h')) {
      io.stdout.write(`usage: ${usageLine(command)}\n${command.summary}\n`);
      return 0;
    }
    let parsed: ReturnType<typeof parseArgs>;
    try {
      parsed = parseArgs({
        args: rest,
        options: { db: { type: 'string' }, ...(command.options ?? {}) },
        allowPositionals: true,
        strict: true,
      });
    } catch (err) {
      throw new UsageError((err as Error).message);
    }
    if (parsed.positionals.length < (command.minPositionals ?? 0)) {
      throw new UsageError('missing argument');
    }
    const dbFlag = parsed.values.db;
    const flags: Partial<Config> = typeof dbFlag === 'string' ? { dbFile: dbFlag } : {};
    const config = loadConfig(io.env, flags);
    const ctx: CommandContext = {
      args: { values: parsed.values, positionals: parsed.positionals },
      config,
      async db() {
        if (!db) {
          const { migrateToLatest, openDb } = await import('../db/database.js');
          db = openDb(config.dbFile);
          await migrateToLatest(db);
        }
        return db;
      },
      stdout: io.stdout,
      stderr: io.stderr,
      stdin: io.stdin,
    };
    const code = await command.run(ctx);
    return typeof code === 'number' ? code : 0;
  } catch (err) {
    if (err instanceof UsageError) {
      io.stderr.write(`phosledger: ${err.message}\nusage: ${usageLine(command)}\n`);
      return 2;
    }
    io.stderr.write(`phosledger: ${(err as Error).message}\n`);
    return 1;
  } finally {
    if (db && command.path[0] !== 'serve') await db.close();
  }
}
