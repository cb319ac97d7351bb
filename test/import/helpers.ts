import { mkdirSync, mkdtempSync, readdirSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { fileURLToPath } from 'node:url';
import { crc32 } from 'node:zlib';
import { openMemoryDb, type Db } from '../../src/db/database.js';

export const FIXTURES = fileURLToPath(new URL('../fixtures/import/', import.meta.url));

/** A fresh temporary folder; `cleanup()` removes it. */
export function tempDir(): { dir: string; cleanup(): void } {
  const dir = mkdtempSync(join(tmpdir(), 'phosledger-import-'));
  return { dir, cleanup: () => rmSync(dir, { recursive: true, force: true }) };
}

/** Copies a fixture folder into `dir`, letting `edit` change files (name -> bytes, null drops). */
export function copyFixture(
  name: string,
  dir: string,
  edit: (file: string, bytes: Buffer) => Buffer | null = (_f, b) => b,
): string {
  const src = join(FIXTURES, name);
  const dest = join(dir, name);
  rmSync(dest, { recursive: true, force: true });
  mkdirSync(dest, { recursive: true });
  for (const f of readdirSync(src)) {
    const out = edit(f, readFileSync(join(src, f)));
    if (out !== null) writeFileSync(join(dest, f), out);
  }
  return dest;
}

/** The files of a fixture folder, name -> bytes. */
export function fixtureFiles(name: string): Record<string, Buffer> {
  const src = join(FIXTURES, name);
  return Object.fromEntries(readdirSync(src).map((f) => [f, readFileSync(join(src, f))]));
}

/** A minimal zip (stored, no compression) of name -> bytes, enough for the zip readers. */
export function makeZip(files: Record<string, Buffer>): Buffer {
  const locals: Buffer[] = [];
  const centrals: Buffer[] = [];
  let offset = 0;
  for (const [name, data] of Object.entries(files)) {
    const nameBytes = Buffer.from(name, 'utf8');
    const crc = crc32(data);
    const local = Buffer.alloc(30);
    local.writeUInt32LE(0x04034b50, 0);
    local.writeUInt16LE(20, 4);
    local.writeUInt16LE(0x0800, 6); // UTF-8 names
    local.writeUInt16LE(0, 8); // stored
    local.writeUInt32LE(crc, 14);
    local.writeUInt32LE(data.length, 18);
    local.writeUInt32LE(data.length, 22);
    local.writeUInt16LE(nameBytes.length, 26);
    const central = Buffer.alloc(46);
    central.writeUInt32LE(0x02014b50, 0);
    central.writeUInt16LE(20, 4);
    central.writeUInt16LE(20, 6);
    central.writeUInt16LE(0x0800, 8);
    central.writeUInt32LE(crc, 16);
    central.writeUInt32LE(data.length, 20);
    central.writeUInt32LE(data.length, 24);
    central.writeUInt16LE(nameBytes.length, 28);
    central.writeUInt32LE(offset, 42);
    locals.push(local, nameBytes, data);
    centrals.push(central, nameBytes);
    offset += 30 + nameBytes.length + data.length;
  }
  const cd = Buffer.concat(centrals);
  const end = Buffer.alloc(22);
  end.writeUInt32LE(0x06054b50, 0);
  const count = Object.keys(files).length;
  end.writeUInt16LE(count, 8);
  end.writeUInt16LE(count, 10);
  end.writeUInt32LE(cd.length, 12);
  end.writeUInt32LE(offset, 16);
  return Buffer.concat([...locals, cd, end]);
}

/** Every row of every food table, as text: equal snapshots mean an unchanged database. */
export function snapshot(db: Db): string {
  const tables = ['food_source', 'food', 'nutrient_def', 'nutrient_value', 'portion'];
  const parts = tables.map((t) =>
    JSON.stringify(db.sqlite.prepare(`select * from ${t} order by 1, 2`).all()),
  );
  parts.push(
    JSON.stringify(db.sqlite.prepare('select rowid, * from food_fts order by rowid').all()),
  );
  return parts.join('\n');
}

/** Runs `fn` over a fresh migrated in-memory database and a temporary folder, both removed after. */
export async function withDb<T>(
  fn: (db: Awaited<ReturnType<typeof openMemoryDb>>, dir: string) => Promise<T>,
): Promise<T> {
  const db = await openMemoryDb();
  const t = tempDir();
  try {
    return await fn(db, t.dir);
  } finally {
    t.cleanup();
    await db.close();
  }
}
