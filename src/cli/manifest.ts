import { readFileSync } from 'node:fs';
import { writeFile } from 'node:fs/promises';
import { join } from 'node:path';
import { DIST_DIR, RUNNING_COMPILED } from '../paths.js';
import type { Command } from './command.js';
import { loadAllCommands } from './commands/index.js';

/** What help shows of a command: written by the build so help loads no command module. */
export interface CommandSummary {
  path: string[];
  usage: string;
  summary: string;
}

const MANIFEST_FILE = join(DIST_DIR, 'cli-commands.json');

function summarise(c: Command): CommandSummary {
  return { path: c.path, usage: c.usage, summary: c.summary };
}

/**
 * Every command's help line. The compiled program reads the list the build wrote (it was made
 * from the same modules, so it cannot drift); the sources load every command module instead.
 */
export async function commandSummaries(): Promise<CommandSummary[]> {
  if (RUNNING_COMPILED) {
    return JSON.parse(readFileSync(MANIFEST_FILE, 'utf8')) as CommandSummary[];
  }
  return (await loadAllCommands()).map(summarise);
}

/** Writes the help list next to the compiled program (run by `npm run build`). */
export async function writeCommandManifest(): Promise<void> {
  const list = (await loadAllCommands()).map(summarise);
  await writeFile(MANIFEST_FILE, `${JSON.stringify(list, null, 1)}\n`);
}
