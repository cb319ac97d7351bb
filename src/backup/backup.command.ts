import { existsSync } from 'node:fs';
import { resolve } from 'node:path';
import { cliActor } from '../audit/actors.js';
import { recordAudit } from '../audit/audit.service.js';
import { systemClock } from '../clock.js';
import { openDb } from '../db/database.js';
import { usePrivateUmask } from '../server/private-files.js';
import type { Command } from '../cli/command.js';
import { backupDatabase, restoreDatabase } from './backup.js';
import { backupKeyFileOf, ensureBackupKey } from './signature.js';

function mib(bytes: number): string {
  return `${(bytes / 1024 / 1024).toFixed(1)} MiB`;
}

export const dbBackup: Command = {
  path: ['db', 'backup'],
  usage: '<file>',
  summary: 'copy the database to <file> (safe while the server runs)',
  minPositionals: 1,
  async run(ctx) {
    usePrivateUmask();
    if (ctx.config.dbFile !== ':memory:' && !existsSync(ctx.config.dbFile)) {
      ctx.stderr.write(`phosledger: no database at ${ctx.config.dbFile}\n`);
      return 1;
    }
    const file = resolve(ctx.args.positionals[0]!);
    const db = await ctx.db();
    const key = ctx.config.dbFile === ':memory:' ? undefined : ensureBackupKey(ctx.config.dbFile);
    const r = await backupDatabase(db.sqlite, file, key ? { key } : {});
    const actor = cliActor();
    await recordAudit(db, {
      userId: actor.userId,
      username: actor.username,
      action: 'db.backup',
      entity: 'database',
      details: { bytes: r.bytes },
    });
    ctx.stdout.write(
      `backup written: ${file} (${mib(r.bytes)}, integrity ok)${r.signature ? `\nsigned: ${r.signature} (restore needs it, and the key ${backupKeyFileOf(ctx.config.dbFile)})` : ''}\n`,
    );
  },
};

export const dbRestore: Command = {
  path: ['db', 'restore'],
  usage: '<file>',
  summary: 'replace the database with a signed, checked backup (refused while a server runs on it)',
  minPositionals: 1,
  async run(ctx) {
    usePrivateUmask();
    const file = resolve(ctx.args.positionals[0]!);
    const r = await restoreDatabase(file, ctx.config.dbFile, systemClock);
    const restored = openDb(ctx.config.dbFile);
    try {
      const actor = cliActor();
      await recordAudit(restored, {
        userId: actor.userId,
        username: actor.username,
        action: 'db.restore',
        entity: 'database',
        details: { bytes: r.bytes, safetyCopy: r.safetyCopy !== null },
      });
    } finally {
      await restored.close();
    }
    ctx.stdout.write(
      [
        `restored ${file} into ${ctx.config.dbFile} (${mib(r.bytes)}, signature, integrity and schema ok)`,
        r.safetyCopy ? `the database as it was is kept in ${r.safetyCopy}` : '',
        r.migrated.length > 0 ? `upgraded with ${r.migrated.join(', ')}` : '',
      ]
        .filter(Boolean)
        .join('\n') + '\n',
    );
  },
};
