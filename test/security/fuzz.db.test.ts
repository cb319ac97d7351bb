import {
  cpSync,
  mkdtempSync,
  readdirSync,
  readFileSync,
  rmSync,
  statSync,
  writeFileSync,
} from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { fileURLToPath } from 'node:url';
import fc from 'fast-check';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { findImporter } from '../../data-import/registry.js';
import { analyzeIngredientsStrict } from '../../src/additives/ingredient-parser.js';
import { openMemoryDb, type Db } from '../../src/db/database.js';
import { parseQuantity, splitQuantity } from '../../src/diary/quantity.js';
import { decodeDiaryBytes, readDiary } from '../../src/diary/reader.js';
import { createTestContext, type TestContext } from '../helpers/context.js';
import { hasSr28 } from '../helpers/shared.js';
import { insertFoods, sr28Foods } from '../helpers/sr28.js';

/**
 * Property tests (fast-check, fixed seeds so a failure replays): malformed requests, files and
 * text never produce a 5xx, an unhandled rejection or a hang; they get a clear 4xx or an
 * expected-failure value. The number of cases is in each test's name.
 */
const SEED = 20260305;
const FIXTURES = fileURLToPath(new URL('../fixtures/import/', import.meta.url));

const RUNS = { route: 25, import: 40, text: 2000 } as const;

/** Routes the fuzzer leaves alone because they end its own session. */
const SESSION_ENDING = new Set([
  'DELETE /api/session',
  'DELETE /api/sessions',
  'PUT /api/session/password',
  'POST /api/admin/users/:id/password',
  'DELETE /api/admin/users/:id/sessions',
  'PATCH /api/admin/users/:id',
]);

function withTimeout<T>(p: Promise<T>, ms: number, what: string): Promise<T> {
  let timer: NodeJS.Timeout;
  return Promise.race([
    p.finally(() => clearTimeout(timer)),
    new Promise<T>((_, reject) => {
      timer = setTimeout(() => reject(new Error(`hang: ${what} took over ${ms} ms`)), ms);
    }),
  ]);
}

const segment = fc.oneof(
  fc.constant('1'),
  fc.nat({ max: 1_000_000 }).map(String),
  fc.constantFrom('-1', '0', '1.5', '9007199254740993', 'abc', '%00', '..', 'null', '1e3'),
  fc.string({ maxLength: 12 }).map(encodeURIComponent),
);
const query = fc.dictionary(
  fc.oneof(
    fc.constantFrom(
      'q',
      'limit',
      'source',
      'group',
      'patientId',
      'version',
      'format',
      'lang',
      'paper',
      'from',
      'to',
      'before',
    ),
    fc.string({ maxLength: 8 }),
  ),
  fc.oneof(
    fc.string({ maxLength: 20 }),
    fc.integer().map(String),
    fc.constant(''),
    fc.constant('-1'),
  ),
  { maxKeys: 4 },
);

// Invented demo patient and plan shapes, mutated field by field.
const patientBody = {
  label: 'FUZZ (invented)',
  language: 'en',
  weightKg: 70,
  ckdStage: '4',
  dialysis: 'none',
  diabetes: false,
  labs: [],
};

function mutate(base: Record<string, unknown>) {
  const keys = Object.keys(base);
  return fc
    .tuple(fc.constantFrom(...keys), fc.jsonValue({ maxDepth: 3 }), fc.boolean())
    .map(([k, v, drop]) => {
      const copy: Record<string, unknown> = { ...base };
      if (drop) delete copy[k];
      else copy[k] = v;
      return copy;
    });
}

describe('fuzzing every JSON route body, query and path parameter', () => {
  let ctx: TestContext;
  let planBody: Record<string, unknown>;
  const unhandled: unknown[] = [];
  const onUnhandled = (e: unknown) => unhandled.push(e);

  beforeAll(async () => {
    process.on('unhandledRejection', onUnhandled);
    ctx = await createTestContext({ as: 'admin' });
    const foodId = hasSr28 ? insertFoods(ctx.db, sr28Foods('01123'))[0]!.id : 1;
    planBody = {
      name: 'Fuzz plan',
      days: [
        { label: 'Monday', occasions: [{ name: 'Breakfast', items: [{ foodId, grams: 100 }] }] },
      ],
    };
    // so that id 1 in a path reaches real records
    await ctx.inject({ method: 'POST', url: '/api/patients', payload: patientBody });
    await ctx.inject({ method: 'POST', url: '/api/patients/1/plans', payload: planBody });
  });
  afterAll(async () => {
    process.off('unhandledRejection', onUnhandled);
    await ctx.close();
  });

  const routeCount = () =>
    ctx.app.routeInventory.filter((r) => !SESSION_ENDING.has(`${r.method} ${r.url}`)).length;

  it(`answers below 500 for ${RUNS.route} random requests per route (GET, HEAD, POST, PUT, PATCH, DELETE)`, async () => {
    const failures: string[] = [];
    let cases = 0;
    for (const r of ctx.app.routeInventory) {
      if (SESSION_ENDING.has(`${r.method} ${r.url}`)) continue;
      if (r.method === 'OPTIONS') continue;
      const hasBody = ['POST', 'PUT', 'PATCH', 'DELETE'].includes(r.method);
      const body = hasBody
        ? fc.oneof(
            fc.jsonValue({ maxDepth: 4 }),
            mutate(patientBody),
            mutate(planBody),
            fc.constant(undefined),
          )
        : fc.constant(undefined);
      await fc.assert(
        fc.asyncProperty(
          fc.array(segment, { minLength: 8, maxLength: 8 }),
          query,
          body,
          async (segs, q, payload) => {
            let i = 0;
            const path = r.url
              .replace(/:[A-Za-z_]\w*/g, () => segs[i++ % segs.length]!)
              .replace(/\*/g, segs[7]!);
            const qs = new URLSearchParams(q as Record<string, string>).toString();
            const url = qs ? `${path}?${qs}` : path;
            cases += 1;
            const res = await withTimeout(
              ctx.inject({
                method: r.method as 'GET',
                url,
                ...(payload !== undefined
                  ? {
                      payload: JSON.stringify(payload),
                      headers: { 'content-type': 'application/json' },
                    }
                  : {}),
              }),
              15_000,
              `${r.method} ${url}`,
            );
            if (res.statusCode >= 500)
              failures.push(
                `${r.method} ${url} ${JSON.stringify(payload)?.slice(0, 200)} -> ${res.statusCode} ${res.body.slice(0, 200)}`,
              );
            return true;
          },
        ),
        { numRuns: RUNS.route, seed: SEED, endOnFailure: true },
      );
    }
    expect(failures.slice(0, 10)).toEqual([]);
    expect(unhandled).toEqual([]);
    expect(cases).toBeGreaterThanOrEqual(routeCount() * RUNS.route * 0.9);
    // the session survived the whole run (the fuzzer stayed signed in)
    expect((await ctx.inject('/api/session')).statusCode).toBe(200);
  }, 600_000);

  it('answers 400 with a clear message for bad JSON, wrong content types and huge numbers', async () => {
    for (const payload of ['{', '{"label":', '\u0000', '[1,2', '{"a":1}}']) {
      const res = await ctx.inject({
        method: 'POST',
        url: '/api/patients',
        payload,
        headers: { 'content-type': 'application/json' },
      });
      expect(res.statusCode).toBe(400);
      expect(res.json().error.code).toMatch(/^PHL_/);
    }
    const text = await ctx.inject({
      method: 'POST',
      url: '/api/patients',
      payload: 'label=x',
      headers: { 'content-type': 'text/plain' },
    });
    // Fastify parses text/plain as a string: the schema then refuses it
    expect(text.statusCode).toBe(400);
    expect(text.json().error.code).toBe('PHL_REQUEST_INVALID');
    for (const weightKg of [1e308, -0, Number.MAX_SAFE_INTEGER, 1e-300]) {
      const res = await ctx.inject({
        method: 'POST',
        url: '/api/patients',
        payload: { ...patientBody, weightKg },
      });
      expect(res.statusCode).toBe(400);
      expect(res.json().error.message).toMatch(/weightKg/);
    }
  });
});

/** Files of a fixture, mutated: random bytes, truncation, flipped bytes, inserted junk. */
function fileMutation(bytes: Buffer) {
  return fc.oneof(
    fc.uint8Array({ maxLength: 4096 }).map((b) => Buffer.from(b)),
    fc.nat({ max: bytes.length }).map((n) => bytes.subarray(0, n)),
    fc
      .array(
        fc.tuple(fc.nat({ max: Math.max(0, bytes.length - 1) }), fc.integer({ min: 0, max: 255 })),
        { minLength: 1, maxLength: 20 },
      )
      .map((flips) => {
        const b = Buffer.from(bytes);
        for (const [at, v] of flips) if (b.length > 0) b[at % b.length] = v;
        return b;
      }),
    fc
      .tuple(
        fc.nat({ max: bytes.length }),
        fc.constantFrom('\r\n', '"', '^', '~', '\t', ',', '\uFEFF', '\u0000', '\u00e9', '\ud800'),
      )
      .map(([at, junk]) =>
        Buffer.concat([bytes.subarray(0, at), Buffer.from(junk), bytes.subarray(at)]),
      ),
  );
}

function counts(db: Db) {
  const one = (q: string) => (db.sqlite.prepare(q).get() as { n: number }).n;
  return {
    sources: one('SELECT count(*) AS n FROM food_source'),
    foods: one('SELECT count(*) AS n FROM food'),
    values: one('SELECT count(*) AS n FROM nutrient_value'),
  };
}

describe('fuzzing the importers with random, truncated and mutated files', () => {
  const cases: Array<{ format: string; fixture: string }> = [
    { format: 'usda-sr28', fixture: 'sr28-mini' },
    { format: 'fdc-csv', fixture: 'fdc-mini' },
    { format: 'off-csv', fixture: 'off-mini.csv' },
    { format: 'products-csv', fixture: 'products-mini.csv' },
  ];
  let dir: string;
  beforeAll(() => {
    dir = mkdtempSync(join(tmpdir(), 'phl-fuzz-'));
  });
  afterAll(() => rmSync(dir, { recursive: true, force: true }));

  for (const c of cases) {
    it(`${c.format}: ${RUNS.import} mutated copies of ${c.fixture} each end in a result value, and a failed one writes nothing`, async () => {
      const importer = findImporter(c.format)!;
      const src = join(FIXTURES, c.fixture);
      const isDir = statSync(src).isDirectory();
      const files = isDir ? readdirSync(src).filter((f) => !f.endsWith('.md')) : [c.fixture];
      const originals = new Map(files.map((f) => [f, readFileSync(isDir ? join(src, f) : src)]));
      const db = await openMemoryDb();
      let failed = 0;
      let n = 0;
      try {
        await fc.assert(
          fc.asyncProperty(
            fc
              .constantFrom(...files)
              .chain((victim) =>
                fileMutation(originals.get(victim)!).map((bytes) => ({ victim, bytes })),
              ),
            async ({ victim, bytes: mutated }) => {
              n += 1;
              const target = join(dir, `${c.format}-${n}`);
              rmSync(target, { recursive: true, force: true });
              let path: string;
              if (isDir) {
                cpSync(src, target, { recursive: true });
                writeFileSync(join(target, victim), mutated);
                path = target;
              } else {
                writeFileSync(`${target}.csv`, mutated);
                path = `${target}.csv`;
              }
              const before = counts(db);
              const result = await withTimeout(
                importer.run(db, path, { release: `fuzz-${n}` }),
                30_000,
                `${c.format} #${n}`,
              );
              if (!result.ok) {
                failed += 1;
                expect(counts(db)).toEqual(before);
                expect(result.fatal.message.length).toBeGreaterThan(0);
              } else {
                for (const e of result.errors) expect(e.message.length).toBeGreaterThan(0);
              }
              return true;
            },
          ),
          { numRuns: RUNS.import, seed: SEED },
        );
      } finally {
        await db.close();
      }
      expect(n).toBe(RUNS.import);
      expect(failed).toBeGreaterThan(0); // the mutations do reach the structural checks
    }, 300_000);
  }
});

describe('fuzzing the pure parsers with arbitrary text', () => {
  const text = fc.oneof(
    fc.string({ maxLength: 300, unit: 'grapheme' }),
    fc.string({ maxLength: 300, unit: 'binary' }),
    fc
      .array(
        fc.constantFrom(
          'E339',
          'E 450(i)',
          'sodium phosphate',
          'fosfato',
          '(',
          ')',
          ',',
          ';',
          ' ',
          'and',
          '[',
          'E',
          '4',
          '5',
          '0',
          '-',
          'ii',
        ),
        { maxLength: 40 },
      )
      .map((a) => a.join('')),
  );

  it(`ingredient analyser: ${RUNS.text} statements, findings always point into the text`, () => {
    fc.assert(
      fc.property(
        text,
        fc.constantFrom(null, 'en', 'es', 'fr', 'de', 'it', 'pt', 'xx'),
        (t, lang) => {
          const { additives } = analyzeIngredientsStrict(t, lang);
          for (const a of additives) {
            expect(a.start).toBeGreaterThanOrEqual(0);
            expect(a.end).toBeLessThanOrEqual(t.length);
            expect(a.start).toBeLessThanOrEqual(a.end);
          }
        },
      ),
      { numRuns: RUNS.text, seed: SEED },
    );
  });

  it(`quantity parser: ${RUNS.text} strings give a value or issues, never a throw`, () => {
    fc.assert(
      fc.property(
        fc.oneof(
          text,
          fc
            .array(
              fc.constantFrom(
                '1',
                '½',
                '/',
                '2',
                ' ',
                'cup',
                'g',
                'oz',
                '-',
                'to',
                'a',
                '.',
                ',',
                'tbsp',
                'medio',
              ),
              { maxLength: 12 },
            )
            .map((a) => a.join('')),
        ),
        (t) => {
          const r = parseQuantity(t);
          if (r.ok) expect(Number.isFinite(r.value.amount ?? 0)).toBe(true);
          else expect(r.issues.length).toBeGreaterThan(0);
          splitQuantity(t);
        },
      ),
      { numRuns: RUNS.text, seed: SEED },
    );
  });

  it(`diary reader: ${RUNS.text} random texts and byte strings give a result value`, () => {
    fc.assert(
      fc.property(
        fc.oneof(
          text,
          fc
            .array(
              fc.constantFrom(
                'date,occasion,food,amount\n',
                '2026-03-05,',
                'breakfast,',
                '"egg, boiled",',
                '2 large\n',
                '\r\n',
                '"',
                ';',
                '\t',
              ),
              { maxLength: 30 },
            )
            .map((a) => a.join('')),
        ),
        fc.uint8Array({ maxLength: 512 }),
        (t, bytes) => {
          const r = readDiary(t);
          expect(typeof r.ok).toBe('boolean');
          if (!r.ok) expect(r.issues.length).toBeGreaterThan(0);
          decodeDiaryBytes(bytes);
        },
      ),
      { numRuns: RUNS.text, seed: SEED },
    );
  });
});
