import { mkdtempSync, readFileSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { migrateToLatest, openDb } from '../../src/db/database.js';
import { writeOffExport } from '../fixtures/import/generate.js';
import { createTestContext, type TestContext } from '../helpers/context.js';

const FIXTURE = new URL('../fixtures/import/products-mini.csv', import.meta.url);

/** A multipart/form-data body with fields in the order given (the file last unless placed). */
function multipart(parts: Array<[string, string] | ['file', string, Buffer]>) {
  const boundary = 'phosledgerTestBoundary7d1';
  const chunks: Buffer[] = [];
  for (const p of parts) {
    if (p.length === 3) {
      chunks.push(
        Buffer.from(
          `--${boundary}\r\nContent-Disposition: form-data; name="file"; filename="${p[1]}"\r\nContent-Type: application/octet-stream\r\n\r\n`,
        ),
        p[2],
        Buffer.from('\r\n'),
      );
    } else {
      chunks.push(
        Buffer.from(
          `--${boundary}\r\nContent-Disposition: form-data; name="${p[0]}"\r\n\r\n${p[1]}\r\n`,
        ),
      );
    }
  }
  chunks.push(Buffer.from(`--${boundary}--\r\n`));
  return {
    payload: Buffer.concat(chunks),
    headers: { 'content-type': `multipart/form-data; boundary=${boundary}` },
  };
}

describe('upload imports (POST /api/imports)', () => {
  let ctx: TestContext;
  let dir: string;

  beforeAll(async () => {
    dir = mkdtempSync(join(tmpdir(), 'phosledger-imports-'));
    const db = openDb(join(dir, 'db.sqlite'));
    await migrateToLatest(db);
    ctx = await createTestContext({ db, as: 'admin' });
  });
  afterAll(async () => {
    await ctx.close();
    rmSync(dir, { recursive: true, force: true });
  });

  /** Waits for the background job by yielding to the event loop (no timers). */
  async function finished(id: number) {
    for (let i = 0; i < 100_000; i++) {
      const job = (await ctx.inject({ url: `/api/imports/${id}` })).json();
      if (job.state === 'done' || job.state === 'failed') return job;
      await new Promise((r) => setImmediate(r));
    }
    throw new Error('import never finished');
  }

  it('lists the formats an upload can be imported as', async () => {
    const formats = (await ctx.inject({ url: '/api/imports/formats' })).json();
    expect(formats.map((f: { format: string }) => f.format)).toEqual(
      expect.arrayContaining(['usda-sr28', 'products-csv']),
    );
  });

  it('imports an uploaded file in the background and reports progress and counts', async () => {
    const file = readFileSync(FIXTURE);
    const res = await ctx.inject({
      method: 'POST',
      url: '/api/imports',
      ...multipart([
        ['format', 'products-csv'],
        ['release', 'upload-test'],
        ['file', 'products-mini.csv', file],
      ]),
    });
    expect(res.statusCode, res.body).toBe(202);
    const started = res.json();
    expect(started).toMatchObject({
      format: 'products-csv',
      fileName: 'products-mini.csv',
      sizeBytes: file.length,
    });
    const job = await finished(started.id);
    expect(job.state).toBe('done');
    expect(job.fraction).toBe(1);
    // The fixture holds invented demo products, one row each (see products-mini.README.md).
    expect(job.result.ok).toBe(true);
    expect(job.result.imported).toBeGreaterThan(0);
    const sources = (await ctx.inject({ url: '/api/sources' })).json();
    const src = sources.find((s: { release: string }) => s.release === 'upload-test');
    expect(src.foods).toBe(job.result.imported);
    const list = (await ctx.inject({ url: '/api/imports' })).json();
    expect(list[0].id).toBe(started.id);
    // Diary audits see the new table: the fixture's invented "Demo renal bread, low phosphorus".
    const audit = await ctx.inject({
      method: 'POST',
      url: '/api/diary-audits',
      payload: { text: 'breakfast: 2 slices demo renal bread\n' },
    });
    expect(audit.statusCode, audit.body).toBe(201);
    expect(audit.json().entries[0].match.name).toBe('Demo renal bread, low phosphorus');
  });

  it('reports a fatal problem as a failed job and changes nothing', async () => {
    const before = (await ctx.inject({ url: '/api/sources' })).json().length;
    const res = await ctx.inject({
      method: 'POST',
      url: '/api/imports',
      ...multipart([
        ['format', 'products-csv'],
        ['file', 'broken.csv', Buffer.from('not,the,right,columns\n1,2,3,4\n')],
      ]),
    });
    expect(res.statusCode).toBe(202);
    const job = await finished(res.json().id);
    expect(job.state).toBe('failed');
    expect(job.error.message.length).toBeGreaterThan(0);
    expect((await ctx.inject({ url: '/api/sources' })).json()).toHaveLength(before);
  });

  it('refuses an unknown format, a missing file, fields after the file, and anonymous uploads', async () => {
    const file = Buffer.from('x');
    const unknown = await ctx.inject({
      method: 'POST',
      url: '/api/imports',
      ...multipart([
        ['format', 'no-such-table'],
        ['file', 'a.csv', file],
      ]),
    });
    expect(unknown.statusCode).toBe(400);
    expect(unknown.json().error.code).toBe('PHL_IMPORT_FORMAT');
    const noFile = await ctx.inject({
      method: 'POST',
      url: '/api/imports',
      ...multipart([['format', 'products-csv']]),
    });
    expect(noFile.statusCode).toBe(400);
    expect(noFile.json().error.message).toContain('no file');
    const late = await ctx.inject({
      method: 'POST',
      url: '/api/imports',
      ...multipart([
        ['file', 'a.csv', file],
        ['format', 'products-csv'],
      ]),
    });
    expect(late.statusCode).toBe(400);
    expect(late.json().error.message).toContain('before the file');
    const anon = await ctx.app.inject({
      method: 'POST',
      url: '/api/imports',
      ...multipart([
        ['format', 'products-csv'],
        ['file', 'a.csv', file],
      ]),
    });
    expect(anon.statusCode).toBe(401);
    const missing = await ctx.inject({ url: '/api/imports/999' });
    expect(missing.statusCode).toBe(404);
    // Importing changes the food tables for everyone: admins only.
    const dietitian = await ctx.signIn('dietitian');
    const refused = await dietitian.inject({
      method: 'POST',
      url: '/api/imports',
      ...multipart([
        ['format', 'products-csv'],
        ['file', 'a.csv', readFileSync(FIXTURE)],
      ]),
    });
    expect(refused.statusCode).toBe(403);
  });

  it('runs one import at a time, lets one wait, refuses a third with 409, and audits start and end', async () => {
    const big = join(dir, 'demo.csv');
    writeOffExport(big, 4000); // invented demo products in the real export layout
    const body = readFileSync(big);
    const send = (release: string) =>
      ctx.inject({
        method: 'POST',
        url: '/api/imports',
        ...multipart([
          ['format', 'off-csv'],
          ['release', release],
          ['file', 'demo.csv', body],
        ]),
      });
    const first = await send('busy-1');
    const second = await send('busy-2');
    const third = await send('busy-3');
    expect([first.statusCode, second.statusCode, third.statusCode]).toEqual([202, 202, 409]);
    expect(third.json().error).toMatchObject({ code: 'PHL_IMPORT_BUSY' });
    expect(third.json().error.message).toMatch(/an import is running and another is waiting/);
    expect(second.json().state).toBe('queued');
    const a = await finished(first.json().id);
    const b = await finished(second.json().id);
    expect([a.state, b.state]).toEqual(['done', 'done']);
    expect(a.result).toMatchObject({ ok: true, imported: 4000 });
    // With both finished, an import is accepted again.
    const again = await send('busy-1');
    expect(again.statusCode).toBe(202);
    await finished(again.json().id);
    // Audit: each start (route) and each end with its counts, by the admin who started it.
    const rows = ctx.db.sqlite
      .prepare(
        "select action, username, outcome, details_json as details from audit_event where action like 'import.%' order by id",
      )
      .all() as Array<{ action: string; username: string; outcome: string; details: string }>;
    const ends = rows.filter(
      (r) => r.action === 'import.run' && r.details.includes('"foods":4000'),
    );
    expect(ends).toHaveLength(3);
    expect(ends.every((r) => r.username === 'test-admin' && r.outcome === 'ok')).toBe(true);
    expect(rows.filter((r) => r.action === 'import.start').length).toBeGreaterThanOrEqual(3);
  });
});
