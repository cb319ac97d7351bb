import { PassThrough } from 'node:stream';
import { mkdtempSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterEach, beforeEach, describe, expect, it } from 'vitest';
import { rescanAdditives } from '../../src/additives/additives.service.js';
import { ADDITIVE_CATALOGUE_VERSION } from '../../src/additives/catalogue.js';
import { runCli } from '../../src/cli/main.js';
import type { Food } from '../../src/foods/food.js';
import { createTestContext, type TestContext } from '../helpers/context.js';
import { testFood } from '../helpers/food.js';
import { insertFoods } from '../helpers/sr28.js';

let ctx: TestContext;
beforeEach(async () => {
  ctx = await createTestContext();
});
afterEach(async () => {
  await ctx.close();
});

/** Invented branded demo foods (not real products). */
function branded(code: string, ingredients: string | null): Food {
  return testFood({
    id: 0,
    sourceId: 0,
    source: 'demo-branded',
    code,
    name: `Demo product ${code}`,
    group: 'Sausages and Luncheon Meats',
    kind: 'branded',
    brandOwner: 'Demo',
    ingredients,
    ingredientsLanguage: 'en',
    per100g: { phosphorusMg: 290, proteinG: 19.3 },
  });
}

describe('POST /api/ingredients/analyze', () => {
  it('returns the findings in the contract shape', async () => {
    const res = await ctx.inject({
      method: 'POST',
      url: '/api/ingredients/analyze',
      payload: { text: 'Käse, Schmelzsalze: Natriumpolyphosphat, E 339', language: 'de' },
    });
    expect(res.statusCode).toBe(200);
    const body = res.json();
    expect(body.catalogueVersion).toBe(ADDITIVE_CATALOGUE_VERSION);
    // 'Käse, Schmelzsalze: ' is 20 UTF-16 units; 'Natriumpolyphosphat' 19 more; then ', ' (2)
    expect(body.additives).toMatchObject([
      {
        code: 'E 452(i)',
        family: '452',
        name: 'Natriumpolyphosphat',
        matchedText: 'Natriumpolyphosphat',
        start: 20,
        end: 39,
        counted: true,
      },
      { code: 'E 339', family: '339', matchedText: 'E 339', start: 41, end: 46, counted: true },
    ]);
  });

  it('refuses a body without text', async () => {
    const res = await ctx.inject({
      method: 'POST',
      url: '/api/ingredients/analyze',
      payload: { language: 'en' },
    });
    expect(res.statusCode).toBe(400);
    expect(res.json().error.code).toBe('PHL_REQUEST_INVALID');
  });
});

describe('rescan of stored additive scans', () => {
  it('recomputes missing and outdated scans, leaves current ones, and is idempotent', async () => {
    const [a, b, c] = insertFoods(ctx.db, [
      branded('A', 'pork, water, salt, E 451'),
      branded('B', 'pork, salt'),
      branded('C', null),
    ]) as [Food, Food, Food];
    ctx.db.sqlite
      .prepare(
        "update food set additive_scan = '{\"additives\":[]}', additive_scan_version = 'old' where id = ?",
      )
      .run(b.id);
    const first = await rescanAdditives(ctx.db);
    expect(first).toMatchObject({
      withStatement: 2,
      rescanned: 2,
      alreadyCurrent: 0,
      withCountedAdditives: 1,
    });
    const row = ctx.db.sqlite
      .prepare('select additive_scan, additive_scan_version from food where id = ?')
      .get(a.id) as {
      additive_scan: string;
      additive_scan_version: string;
    };
    expect(row.additive_scan_version).toBe(ADDITIVE_CATALOGUE_VERSION);
    expect(JSON.parse(row.additive_scan).additives[0].code).toBe('E 451');
    const none = ctx.db.sqlite.prepare('select additive_scan from food where id = ?').get(c.id) as {
      additive_scan: string | null;
    };
    expect(none.additive_scan).toBeNull();
    const second = await rescanAdditives(ctx.db);
    expect(second).toMatchObject({ rescanned: 0, alreadyCurrent: 2 });
    expect((await rescanAdditives(ctx.db, { all: true })).rescanned).toBe(2);
  });
});

function io() {
  const stdout = new PassThrough();
  const stderr = new PassThrough();
  let out = '';
  let err = '';
  stdout.on('data', (d: Buffer) => (out += d.toString()));
  stderr.on('data', (d: Buffer) => (err += d.toString()));
  return {
    io: { stdout, stderr, stdin: new PassThrough(), env: {} },
    out: () => out,
    err: () => err,
  };
}

describe('phosledger ingredients check / rescan', () => {
  it('prints the contract JSON with --json', async () => {
    const t = io();
    const code = await runCli(
      ['ingredients', 'check', 'water, sugar, phosphoric acid, E 452(i)', '--json'],
      t.io,
    );
    expect(code).toBe(0);
    const json = JSON.parse(t.out());
    expect(Object.keys(json)).toEqual(['additives']);
    expect(
      json.additives.map((a: { code: string; start: number; end: number }) => [
        a.code,
        a.start,
        a.end,
      ]),
    ).toEqual([
      ['E 338', 14, 29],
      ['E 452(i)', 31, 39],
    ]);
    for (const a of json.additives)
      expect(Object.keys(a).sort()).toEqual([
        'code',
        'counted',
        'end',
        'family',
        'matchedText',
        'name',
        'reason',
        'start',
      ]);
  });

  it('prints a readable list without --json, and says when nothing is found', async () => {
    const t = io();
    await runCli(['ingredients', 'check', 'lecithin, sodium phosphates'], t.io);
    expect(t.out()).toMatch(/noted\s+E 322/);
    expect(t.out()).toMatch(/COUNTED\s+E 339/);
    const u = io();
    await runCli(['ingredients', 'check', 'phosphate-free ham'], u.io);
    expect(u.out()).toBe('no phosphate additives found\n');
  });

  it('reads the statement from standard input with "-"', async () => {
    const t = io();
    t.io.stdin.end('Eau, sucre, acide phos-\nphorique\n');
    await runCli(['ingredients', 'check', '-', '--json'], t.io);
    const json = JSON.parse(t.out());
    expect(
      json.additives.map((a: { code: string; matchedText: string }) => [a.code, a.matchedText]),
    ).toEqual([['E 338', 'acide phos-\nphorique']]);
  });

  it('rescans a database file', async () => {
    const dir = mkdtempSync(join(tmpdir(), 'phl-rescan-'));
    try {
      const t = io();
      const code = await runCli(
        ['ingredients', 'rescan', '--json', '--db', join(dir, 'db.sqlite')],
        t.io,
      );
      expect(code).toBe(0);
      expect(JSON.parse(t.out())).toMatchObject({
        catalogueVersion: ADDITIVE_CATALOGUE_VERSION,
        withStatement: 0,
        rescanned: 0,
      });
    } finally {
      rmSync(dir, { recursive: true, force: true });
    }
  });
});

describe('start-up rescan step', () => {
  it('rescans only when some scan is outdated', async () => {
    const { rescanOutdatedScans } = await import('../../src/additives/additives.service.js');
    const [a] = insertFoods(ctx.db, [branded('S', 'pork, diphosphates')]) as [Food];
    const t = io();
    await rescanOutdatedScans({ db: ctx.db, io: t.io });
    expect(t.out()).toMatch(/1 foods rescanned/);
    const again = io();
    await rescanOutdatedScans({ db: ctx.db, io: again.io });
    expect(again.out()).toBe('');
    const row = ctx.db.sqlite
      .prepare('select additive_scan_version v from food where id = ?')
      .get(a.id) as { v: string };
    expect(row.v).toBe(ADDITIVE_CATALOGUE_VERSION);
  });
});
