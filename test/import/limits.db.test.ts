import { readFileSync, statSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { gzipSync } from 'node:zlib';
import { describe, expect, it } from 'vitest';
import {
  DEFAULT_UNPACK_LIMITS,
  unpackLimitsFromEnv,
  type ImportProgress,
} from '../../data-import/importer.js';
import { offCsv } from '../../data-import/off-csv.js';
import { usdaSr28 } from '../../data-import/usda-sr28.js';
import { fixedClock } from '../../src/clock.js';
import { writeOffExport } from '../fixtures/import/generate.js';
import { FIXTURES, fixtureFiles, makeZip, snapshot, withDb } from './helpers.js';

const clock = fixedClock('2026-03-05T09:30:00Z'); // invented fixed test time

describe('compressed input: progress, damage and limits (invented demo products)', () => {
  it('reports progress on the compressed bytes read, from 0 to the file size', () =>
    withDb(async (db, dir) => {
      const gz = join(dir, 'demo.csv.gz');
      writeOffExport(gz, 3000); // invented demo products, real export header
      const size = statSync(gz).size;
      const seen: ImportProgress[] = [];
      const r = await offCsv.run(db, gz, { clock, onProgress: (p) => seen.push({ ...p }) });
      expect(r).toMatchObject({ ok: true, imported: 3000 });
      const reading = seen.filter((p) => p.phase === 'reading');
      // The total is the compressed size on disk, not the unpacked size.
      expect(new Set(reading.map((p) => p.bytesTotal))).toEqual(new Set([size]));
      expect(reading.some((p) => p.bytesDone > 0 && p.bytesDone < size)).toBe(true);
      const done = reading.map((p) => p.bytesDone);
      expect(done).toEqual([...done].sort((a, b) => a - b));
      expect(seen.at(-1)).toMatchObject({ phase: 'publishing', bytesDone: size });
    }));

  it('turns a cut or fake .gz into its own error with file, line and code, changing nothing', () =>
    withDb(async (db, dir) => {
      const text = readFileSync(join(FIXTURES, 'off-mini.csv'));
      const ok = join(dir, 'demo.csv.gz');
      writeFileSync(ok, gzipSync(text));
      expect((await offCsv.run(db, ok, { clock })).ok).toBe(true);
      const before = snapshot(db);
      const gz = gzipSync(Buffer.concat(Array.from({ length: 50 }, () => text)));
      const cases: Array<[string, Buffer]> = [
        ['cut.csv.gz', gz.subarray(0, Math.floor(gz.length * 0.6))],
        ['fake.csv.gz', Buffer.concat([Buffer.from([0x1f, 0x8b, 8, 0]), text])],
        ['renamed.csv.gz', text],
      ];
      for (const [name, bytes] of cases) {
        writeFileSync(join(dir, name), bytes);
        const r = await offCsv.run(db, join(dir, name), { clock, release: 'demo' });
        expect({ name, ok: r.ok }).toEqual({ name, ok: false });
        if (r.ok) continue;
        expect(r.fatal).toMatchObject({ file: name, code: 'PHL_IMPORT_DECOMPRESS' });
        expect(r.fatal.line).toBeGreaterThanOrEqual(1);
        expect(r.fatal.message).toContain('the database was not changed');
        expect(r.fatal.message).toContain(`${name} line ${r.fatal.line}`);
        expect(snapshot(db)).toBe(before);
      }
    }));

  it('stops a file that unpacks past the size or ratio limit, changing nothing', () =>
    withDb(async (db, dir) => {
      const before = snapshot(db);
      const header = readFileSync(join(FIXTURES, 'off-mini.csv'), 'utf8').split('\n')[0];
      // 8 MiB of one repeated line compresses far beyond 200:1.
      const line = readFileSync(join(FIXTURES, 'off-mini.csv'), 'utf8').split('\n')[1];
      const body = `${line}\n`.repeat(Math.ceil((8 * 1024 * 1024) / (line?.length ?? 1)));
      const bomb = join(dir, 'bomb.csv.gz');
      writeFileSync(bomb, gzipSync(`${header}\n${body}`, { level: 9 }));
      const r = await offCsv.run(db, bomb, { clock });
      expect(r).toMatchObject({ ok: false, fatal: { code: 'PHL_IMPORT_UNPACK_LIMIT' } });
      if (!r.ok)
        expect(r.fatal.message).toMatch(/more than 200 times.*the database was not changed/);
      // A size limit set lower than the file (configurable): the same error, by size.
      const small = join(dir, 'small.csv.gz');
      writeFileSync(small, gzipSync(readFileSync(join(FIXTURES, 'off-mini.csv'))));
      const r2 = await offCsv.run(db, small, { clock, limits: { maxUnpackedBytes: 1000 } });
      expect(r2).toMatchObject({ ok: false, fatal: { code: 'PHL_IMPORT_UNPACK_LIMIT' } });
      if (!r2.ok)
        expect(r2.fatal.message).toContain('unpacks to more than 1 KiB (the import limit');
      // The same limits apply to zip members.
      const zip = join(dir, 'sr.zip');
      writeFileSync(zip, makeZip(fixtureFiles('sr28-mini')));
      const r3 = await usdaSr28.run(db, zip, { clock, limits: { maxUnpackedBytes: 100 } });
      expect(r3).toMatchObject({ ok: false, fatal: { code: 'PHL_IMPORT_UNPACK_LIMIT' } });
      expect(snapshot(db)).toBe(before);
    }));

  it('reads the limits from the environment (defaults 20 GiB and 200:1), refusing nonsense', () => {
    expect(unpackLimitsFromEnv({})).toEqual(DEFAULT_UNPACK_LIMITS);
    expect(DEFAULT_UNPACK_LIMITS).toEqual({ maxUnpackedBytes: 20 * 1024 ** 3, maxRatio: 200 });
    expect(
      unpackLimitsFromEnv({
        PHOSLEDGER_IMPORT_MAX_UNPACKED_GIB: '1.5',
        PHOSLEDGER_IMPORT_MAX_RATIO: '50',
      }),
    ).toEqual({ maxUnpackedBytes: 1.5 * 1024 ** 3, maxRatio: 50 });
    expect(() => unpackLimitsFromEnv({ PHOSLEDGER_IMPORT_MAX_RATIO: 'lots' })).toThrow(
      /PHOSLEDGER_IMPORT_MAX_RATIO must be a positive number/,
    );
  });

  it('checks free disk before starting and says how much is needed', () =>
    withDb(async (db) => {
      const r = await offCsv.run(db, join(FIXTURES, 'off-mini.csv'), {
        clock,
        freeBytes: async () => 10 * 1024 * 1024, // a fake disk with 10 MiB free
      });
      expect(r).toMatchObject({ ok: false, fatal: { code: 'PHL_IMPORT_DISK_SPACE' } });
      // off-mini.csv is a few KiB: 2.5 x that + 64 MiB needed = 64.0 MiB.
      if (!r.ok) expect(r.fatal.message).toMatch(/needs about 64\.0 MiB .* 10\.0 MiB are free/);
      expect(db.sqlite.prepare('select count(*) as n from food').get()).toEqual({ n: 0 });
    }));
});
