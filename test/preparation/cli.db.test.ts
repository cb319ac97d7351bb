import { mkdtempSync, rmSync, writeFileSync } from 'node:fs';
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
  out.on('data', (c: Buffer) => chunks.push(c.toString()));
  const code = await runCli(args, { stdout: out, stderr: err, stdin: new PassThrough(), env });
  return { code, stdout: chunks.join('') };
}

const skip = !hasSr28;

describe.skipIf(skip)(
  `foods show --json and plan summary --json with preparation ${hasSr28 ? '(USDA SR28)' : SR28_MISSING}`,
  () => {
    let dir: string;
    let env: NodeJS.ProcessEnv;
    let potatoId = 0;
    let boiledId = 0;
    beforeAll(async () => {
      dir = mkdtempSync(join(tmpdir(), 'phosledger-prep-'));
      const file = join(dir, 'test.sqlite');
      const db = openDb(file);
      await migrateToLatest(db);
      // USDA SR28 NDB 11352 Potatoes, flesh and skin, raw; 11367 Potatoes, boiled, without skin
      const [potato, boiled] = insertFoods(db, sr28Foods('11352', '11367'));
      potatoId = potato?.id ?? 0;
      boiledId = boiled?.id ?? 0;
      await db.close();
      env = { PHOSLEDGER_DB: file, PHOSLEDGER_NO_DEMO: '1' };
    });
    afterAll(() => rmSync(dir, { recursive: true, force: true }));

    it('foods show --json: cookedState and preparations', async () => {
      const raw = JSON.parse(
        (await cli(['foods', 'show', String(potatoId), '--json'], env)).stdout,
      );
      expect(raw.cookedState).toBe('raw');
      expect(raw.preparations.map((p: { method: string }) => p.method)).toEqual([
        'boil-drain',
        'soak-boil-drain',
        'double-boil-drain',
      ]);
      for (const p of raw.preparations)
        for (const n of ['phosphorus', 'potassium', 'sodium', 'calcium', 'protein'])
          expect(Object.keys(p.factors[n])).toEqual(['low', 'typical', 'high']);
      const boiled = JSON.parse(
        (await cli(['foods', 'show', String(boiledId), '--json'], env)).stdout,
      );
      expect([boiled.cookedState, boiled.preparations]).toEqual(['cooked', []]);
    });

    it('plan create --file takes preparation; plan summary --json shows it', async () => {
      const patient = join(dir, 'patient.json');
      writeFileSync(
        patient,
        JSON.stringify({
          label: 'PREP-CLI (invented)',
          weightKg: 60,
          ckdStage: '4',
          dialysis: 'none',
          diabetes: false,
        }),
      );
      const made = await cli(['patient', 'create', '--file', patient], env);
      const patientId = Number(/patient (\d+) created/.exec(made.stdout)?.[1]);
      const planFile = join(dir, 'plan.json');
      writeFileSync(
        planFile,
        JSON.stringify({
          name: 'Potatoes twice boiled',
          days: [
            {
              label: 'Day 1',
              occasions: [
                {
                  name: 'Dinner',
                  items: [{ foodId: potatoId, grams: 200, preparation: 'double-boil-drain' }],
                },
              ],
            },
          ],
        }),
      );
      const plan = await cli(
        ['plan', 'create', '--patient', String(patientId), '--file', planFile, '--json'],
        env,
      );
      expect(plan.code ?? 0).toBe(0);
      const planId = JSON.parse(plan.stdout).id;
      const s = JSON.parse((await cli(['plan', 'summary', String(planId), '--json'], env)).stdout);
      const item = s.days[0].occasions[0].items[0];
      // tuber yield 1.0 (from memory): 200 g either way; K 425 mg/100 g x 2 x 0.45 = 382.5 mg
      // (USDA SR28 NDB 11352; double boiling: Burrowes 2006, Bethke 2008, typical from memory)
      expect(item.preparation).toMatchObject({ method: 'double-boil-drain', tableGrams: 200 });
      expect(item.nutrients.potassiumMg).toBe(382.5);
      // P 57 x 2 x 0.60 = 68.4 mg
      expect(item.nutrients.phosphorusMg).toBe(68.4);
    });
  },
);
