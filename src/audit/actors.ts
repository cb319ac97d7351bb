import { userInfo } from 'node:os';
import type { Clock } from '../clock.js';
import { systemClock } from '../clock.js';
import type { Db } from '../db/database.js';
import { recordAudit } from './audit.service.js';

/** Who acted, for events that come from the command line or the program itself. */
export interface Actor {
  userId: number | null;
  username: string | null;
}

/** The operating-system account running a CLI command ("cli:<name>"). */
export function cliActor(): Actor {
  let name = 'unknown';
  try {
    name = userInfo().username;
  } catch {
    // no passwd entry (some containers): keep 'unknown'
  }
  return { userId: null, username: `cli:${name}` };
}

export const SYSTEM_FIRST_START: Actor = { userId: null, username: 'system:first-start' };

/** What an import result says about itself, for the audit log (no file contents). */
interface ImportOutcome {
  ok: boolean;
  format: string;
  release?: string;
  imported: number;
  skipped: number;
  values?: number;
  fatal?: { code: string };
}

/** Records one import (every import is audited, whoever starts it). */
export async function auditImport(
  db: Db,
  result: ImportOutcome,
  actor: Actor,
  clock: Clock = systemClock,
): Promise<void> {
  await recordAudit(
    db,
    {
      userId: actor.userId,
      username: actor.username,
      action: 'import.run',
      entity: 'import',
      entityId: result.ok && result.release ? `${result.format}:${result.release}` : result.format,
      outcome: result.ok ? 'ok' : 'failed',
      details: {
        format: result.format,
        foods: result.imported,
        skipped: result.skipped,
        values: result.values ?? null,
        error: result.fatal?.code ?? null,
      },
    },
    clock,
  );
}
