import { mkdtempSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { PassThrough } from 'node:stream';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { runCli } from '../../src/cli/main.js';
import { migrateToLatest, openDb } from '../../src/db/database.js';
import { hasSr28, SR28_MISSING } from '../helpers/shared.js';
import { insertFoods, sr28Foods } from '../helpers/sr28.js';

function io() {
  const out = new PassThrough();
  const err = new PassThrough();
  let stdout = '';
  let stderr = '';
  out.on('data', (c) => (stdout += String(c)));
  err.on('data', (c) => (stderr += String(c)));
  return {
    io: { stdout: out, stderr: err, stdin: new PassThrough(), env: {} },
    text: () => ({ stdout, stderr }),
  };
}

let dir: string;
let dbFile: string;
beforeAll(async () => {
  dir = mkdtempSync(join(tmpdir(), 'phosledger-diary-'));
  dbFile = join(dir, 'test.db');
  const db = openDb(dbFile);
  await migrateToLatest(db);
  // USDA SR28 NDB 18069 bread, white; 01077 milk, whole; 01009 cheese, cheddar; 14148 cola
  if (hasSr28) insertFoods(db, sr28Foods('18069', '01077', '01009', '14148'));
  await db.close();
});
afterAll(() => rmSync(dir, { recursive: true, force: true }));

describe(`phosledger diary audit (${hasSr28 ? 'SR28 found' : SR28_MISSING})`, () => {
  it.skipIf(!hasSr28)('--json prints the fixed contract', async () => {
    const file = join(dir, 'diary.txt');
    // invented demo diary
    writeFileSync(
      file,
      'Monday\nbreakfast: 2 slices white bread\nsnack: cheddar cheese 30 g\nzzzz qqqq\n',
    );
    const t = io();
    const code = await runCli(['diary', 'audit', file, '--json', '--db', dbFile], t.io);
    expect(t.text().stderr).toBe('');
    expect(code).toBe(0);
    const j = JSON.parse(t.text().stdout);
    expect(Object.keys(j)).toEqual(expect.arrayContaining(['entries', 'days', 'unmatched']));
    const e = j.entries[0];
    for (const k of [
      'line',
      'text',
      'match',
      'grams',
      'quantityAssumed',
      'phosphorusMg',
      'absorbablePhosphorusMg',
      'additivePhosphorusMg',
      'hidden',
      'findings',
    ]) {
      expect(e).toHaveProperty(k);
    }
    expect(Object.keys(e.match).sort()).toEqual(['confidence', 'foodId', 'name']);
    // 2 x 29 g slice x 98 mg/100 g (USDA SR28 NDB 18069) = 56.84 mg
    expect(e).toMatchObject({ line: 2, grams: 58, phosphorusMg: 56.8 });
    expect(j.days[0]).toHaveProperty('date', null);
    expect(Object.keys(j.days[0].nutrients)).toEqual(
      expect.arrayContaining([
        'phosphorusMg',
        'absorbablePhosphorusMg',
        'additivePhosphorusMg',
        'proteinG',
        'phosphorusProteinRatioMgPerG',
        'potassiumMg',
        'sodiumMg',
        'calciumMg',
        'energyKcal',
      ]),
    );
    expect(j.unmatched).toEqual([4]);
  });

  it.skipIf(!hasSr28)('--pdf writes a clinician PDF; the template CSV audits', async () => {
    const out = join(dir, 'audit.pdf');
    const template = new URL('../../templates/diary-template.csv', import.meta.url).pathname;
    const t = io();
    const code = await runCli(['diary', 'audit', template, '--pdf', out, '--db', dbFile], t.io);
    expect(code).toBe(0);
    expect(readFileSync(out).subarray(0, 5).toString('latin1')).toBe('%PDF-');
  });

  it('bad files: clear message, exit code 1; bad options: usage, exit code 2', async () => {
    const empty = join(dir, 'empty.csv');
    writeFileSync(empty, '');
    let t = io();
    expect(await runCli(['diary', 'audit', empty, '--db', dbFile], t.io)).toBe(1);
    expect(t.text().stderr).toContain('PHL_DIARY_EMPTY');
    t = io();
    expect(await runCli(['diary', 'audit', join(dir, 'missing.csv'), '--db', dbFile], t.io)).toBe(
      1,
    );
    expect(t.text().stderr).toContain('cannot read');
    t = io();
    expect(await runCli(['diary', 'audit', empty, '--patient', 'x', '--db', dbFile], t.io)).toBe(2);
  });
});
