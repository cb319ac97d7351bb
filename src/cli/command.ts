import type { ParseArgsConfig } from 'node:util';
import type { Config } from '../config.js';
import type { Db } from '../db/database.js';
import { AppError } from '../errors.js';

/** Output streams and the opened database, handed to every command (tests pass fakes). */
export interface CommandContext {
  args: {
    values: Record<string, string | boolean | (string | boolean)[] | undefined>;
    positionals: string[];
  };
  config: Config;
  /** Opens and migrates the configured database on first use. */
  db(): Promise<Db>;
  stdout: NodeJS.WritableStream;
  stderr: NodeJS.WritableStream;
  stdin: NodeJS.ReadableStream;
}

export interface Command {
  /** Words that name the command, e.g. ['foods', 'search']. */
  path: string[];
  /** One usage line after the command words, e.g. '<text> [--json]'. */
  usage: string;
  summary: string;
  options?: ParseArgsConfig['options'];
  /** Minimum number of positional arguments after the command words. */
  minPositionals?: number;
  run(ctx: CommandContext): Promise<number | void>;
}

/** A usage error: printed with the command's usage line, exit code 2. */
export class UsageError extends Error {
  constructor(message: string) {
    super(message);
    this.name = 'UsageError';
  }
}

/** Runs a command's body; a known error (AppError) prints its message and code and exits 1. */
export async function guarded(
  ctx: CommandContext,
  body: () => Promise<number | void>,
): Promise<number | void> {
  try {
    return await body();
  } catch (err) {
    if (err instanceof AppError) {
      ctx.stderr.write(`phosledger: ${err.message} (${err.code})\n`);
      return 1;
    }
    throw err;
  }
}
