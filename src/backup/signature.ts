import { createHmac, randomBytes, timingSafeEqual } from 'node:crypto';
import { createReadStream, existsSync, readFileSync, writeFileSync } from 'node:fs';
import { PRIVATE_FILE_MODE, ensurePrivateDir } from '../server/private-files.js';
import { dirname } from 'node:path';

/**
 * Backups are signed with HMAC-SHA256 (RFC 2104, FIPS 198-1) under a key kept beside the
 * database in its own file (`<db>.backup-key`, mode 0600), never inside the database: a backup
 * is restored only when its signature verifies, so a file this installation did not write
 * (or one changed after it was written) is refused before it is opened.
 */
const KEY_BYTES = 32; // 256-bit key: RFC 2104 asks for at least the hash's output length (from memory)
const SIGNATURE_FORMAT = 'phosledger-backup-signature';

export function backupKeyFileOf(dbFile: string): string {
  return `${dbFile}.backup-key`;
}

export function signatureFileOf(backupFile: string): string {
  return `${backupFile}.sig`;
}

/** Creates the key file on first use (random, 0600); returns the key. */
export function ensureBackupKey(dbFile: string): Buffer {
  const file = backupKeyFileOf(dbFile);
  if (!existsSync(file)) {
    ensurePrivateDir(dirname(file));
    try {
      writeFileSync(file, `${randomBytes(KEY_BYTES).toString('hex')}\n`, {
        flag: 'wx',
        mode: PRIVATE_FILE_MODE,
      });
    } catch (err) {
      if ((err as NodeJS.ErrnoException).code !== 'EEXIST') throw err;
    }
  }
  return readBackupKey(dbFile);
}

/** The key, or an error that says where it was looked for. */
export function readBackupKey(dbFile: string): Buffer {
  const file = backupKeyFileOf(dbFile);
  let text: string;
  try {
    text = readFileSync(file, 'utf8').trim();
  } catch {
    throw new Error(
      `no backup key at ${file}: a backup can be verified only with the key of the installation that wrote it (copy that key file there)`,
    );
  }
  if (!/^[0-9a-f]{64}$/.test(text)) throw new Error(`the backup key ${file} is damaged`);
  return Buffer.from(text, 'hex');
}

async function hmacOf(file: string, key: Buffer): Promise<{ hex: string; bytes: number }> {
  const mac = createHmac('sha256', key);
  let bytes = 0;
  for await (const chunk of createReadStream(file)) {
    mac.update(chunk as Buffer);
    bytes += (chunk as Buffer).length;
  }
  return { hex: mac.digest('hex'), bytes };
}

/** Writes `<backup>.sig` (JSON: format, algorithm, size, HMAC) beside the backup, 0600. */
export async function signBackup(backupFile: string, key: Buffer): Promise<string> {
  const { hex, bytes } = await hmacOf(backupFile, key);
  const sig = signatureFileOf(backupFile);
  const body = { format: SIGNATURE_FORMAT, version: 1, algorithm: 'HMAC-SHA256', bytes, hmac: hex };
  writeFileSync(sig, `${JSON.stringify(body)}\n`, { mode: PRIVATE_FILE_MODE });
  return sig;
}

/** Null when `<backup>.sig` verifies under the key; otherwise why not. */
export async function verifyBackup(backupFile: string, key: Buffer): Promise<string | null> {
  const sig = signatureFileOf(backupFile);
  let body: { format?: unknown; algorithm?: unknown; hmac?: unknown };
  try {
    body = JSON.parse(readFileSync(sig, 'utf8')) as typeof body;
  } catch {
    return `no readable signature ${sig}: phosledger restores only backups it wrote and signed`;
  }
  if (body.format !== SIGNATURE_FORMAT || body.algorithm !== 'HMAC-SHA256') {
    return `${sig} is not a phosledger backup signature`;
  }
  const { hex } = await hmacOf(backupFile, key);
  const want = Buffer.from(String(body.hmac), 'hex');
  const got = Buffer.from(hex, 'hex');
  if (want.length !== got.length || !timingSafeEqual(want, got)) {
    return 'the signature does not match: the file was changed after it was written, or another installation (another key) wrote it';
  }
  return null;
}
