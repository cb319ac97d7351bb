import { mkdtempSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { PassThrough } from 'node:stream';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { runCli } from '../../src/cli/main.js';
import { migrateToLatest, openDb } from '../../src/db/database.js';
import { hasSr28, SR28_MISSING } from '../helpers/shared.js';
import { insertFoods, sr28Foods } from '../helpers/sr28.js';

async function cli(args: string[], env: NodeJS.ProcessEnv) {
  const out = new PassThrough();
  const err = new PassThrough();
  const chunks: string[] = [];
  const errChunks: string[] = [];
  out.on('data', (c: Buffer) => chunks.push(c.toString()));
  err.on('data', (c: Buffer) => errChunks.push(c.toString()));
  const code = await runCli(args, { stdout: out, stderr: err, stdin: new PassThrough(), env });
  return { code, stdout: chunks.join(''), stderr: errChunks.join('') };
}

describe.skipIf(!hasSr28)(
  `foods search / foods show --json (source: USDA SR28 files) ${hasSr28 ? '' : SR28_MISSING}`,
  () => {
    let dir: string;
    let env: NodeJS.ProcessEnv;
    let cheddarId: number;

    beforeAll(async () => {
      dir = mkdtempSync(join(tmpdir(), 'phosledger-cli-'));
      const file = join(dir, 'test.sqlite');
      const db = openDb(file);
      await migrateToLatest(db);
      // USDA SR28 NDB 01009 Cheese, cheddar; NDB 14400 Carbonated beverage, cola
      const [cheddar] = insertFoods(db, sr28Foods('01009', '14400'));
      cheddarId = cheddar?.id ?? 0;
      await db.close();
      env = { PHOSLEDGER_DB: file };
    });
    afterAll(() => rmSync(dir, { recursive: true, force: true }));

    it('prints a JSON array of hits in the contract shape', async () => {
      const r = await cli(['foods', 'search', 'chedd', '--json'], env);
      expect(r.code).toBe(0);
      const hits = JSON.parse(r.stdout) as Array<Record<string, unknown>>;
      expect(Array.isArray(hits)).toBe(true);
      expect(hits[0]).toMatchObject({
        id: cheddarId,
        source: 'usda-sr28',
        code: '01009',
        name: 'Cheese, cheddar',
        group: 'Dairy and Egg Products',
        kind: 'generic',
        // USDA SR28 NDB 01009: P 455 mg, protein 22.87 g per 100 g -> 455 / 22.87 = 19.9 mg/g
        per100g: { phosphorusMg: 455, proteinG: 22.87 },
      });
      expect(hits[0]?.phosphorusProteinRatioMgPerG).toBeCloseTo(19.9, 1);
      expect((hits[0]?.phosphorus as { totalMg: number }).totalMg).toBe(455);
    });

    it('shows one food with nulls for values the table lacks and its phosphorus profile', async () => {
      const r = await cli(['foods', 'show', String(cheddarId), '--json'], env);
      expect(r.code).toBe(0);
      const food = JSON.parse(r.stdout);
      expect(food.per100g.phosphorusMg).toBe(455); // USDA SR28 NDB 01009
      expect(food.per100g.phytateMg).toBeNull(); // SR28 gives no phytate for cheddar
      expect(food.portions.length).toBeGreaterThan(0);
      expect(food.phosphorus.method).toBeTypeOf('string');
      const p = food.phosphorus;
      expect(p.organicAnimalMg + p.organicPlantMg + p.additiveMg).toBeCloseTo(p.totalMg, 0);
    });

    it('answers a bad id with a usage error and an unknown id with exit code 1', async () => {
      expect((await cli(['foods', 'show', 'abc'], env)).code).toBe(2);
      const missing = await cli(['foods', 'show', '999999'], env);
      expect(missing.code).toBe(1);
      expect(missing.stderr).toMatch(/not found/);
    });
  },
);
