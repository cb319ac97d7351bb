import { projectPath } from './paths.js';
import { z } from 'zod';

/** Where the embedded default database lives, relative to the checkout. */
export const DEFAULT_DB_FILE = projectPath('db', 'phosledger.sqlite');

const envSchema = z.object({
  PHOSLEDGER_DB: z.string().min(1).optional(),
  PHOSLEDGER_HOST: z.string().min(1).optional(),
  PHOSLEDGER_PORT: z.coerce.number().int().min(0).max(65535).optional(),
  PHOSLEDGER_NO_DEMO: z.enum(['0', '1', 'true', 'false']).optional(),
  PHOSLEDGER_LOG_LEVEL: z
    .enum(['fatal', 'error', 'warn', 'info', 'debug', 'trace', 'silent'])
    .optional(),
});

export interface Config {
  readonly dbFile: string;
  readonly host: string;
  readonly port: number;
  readonly seedDemo: boolean;
  readonly logLevel: string;
}

/** Parses the environment once, failing fast with the variable's name. Flags override env. */
export function loadConfig(
  env: NodeJS.ProcessEnv = process.env,
  flags: Partial<Config> = {},
): Config {
  const parsed = envSchema.safeParse(env);
  if (!parsed.success) {
    const issue = parsed.error.issues[0];
    throw new Error(
      `invalid environment variable ${String(issue?.path[0])}: ${issue?.message ?? 'invalid'}`,
    );
  }
  const e = parsed.data;
  return Object.freeze({
    dbFile: flags.dbFile ?? e.PHOSLEDGER_DB ?? DEFAULT_DB_FILE,
    host: flags.host ?? e.PHOSLEDGER_HOST ?? '127.0.0.1',
    port: flags.port ?? e.PHOSLEDGER_PORT ?? 8080,
    seedDemo: flags.seedDemo ?? !(e.PHOSLEDGER_NO_DEMO === '1' || e.PHOSLEDGER_NO_DEMO === 'true'),
    logLevel: flags.logLevel ?? e.PHOSLEDGER_LOG_LEVEL ?? 'info',
  });
}
