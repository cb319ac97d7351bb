import { execFileSync } from 'node:child_process';
import { existsSync, mkdtempSync, readFileSync, rmSync } from 'node:fs';
import { request as httpsRequest } from 'node:https';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { PassThrough } from 'node:stream';
import { afterEach, describe, expect, it } from 'vitest';
import { exposureWarning, isLoopback } from '../../src/auth/transport.js';
import { fixedClock } from '../../src/clock.js';
import { loadConfig } from '../../src/config.js';
import { serve } from '../../src/server/serve.js';

function collector() {
  const stream = new PassThrough();
  let text = '';
  stream.on('data', (c: Buffer) => (text += c.toString('utf8')));
  return { stream, text: () => text };
}

const hasOpenssl = existsSync('/usr/bin/openssl');

describe('the server over a real socket on 127.0.0.1 (first-run set-up, cookies, TLS)', () => {
  let dir: string;
  let close: (() => Promise<void>) | undefined;
  afterEach(async () => {
    await close?.();
    close = undefined;
    rmSync(dir, { recursive: true, force: true });
  });

  async function start(extra: { tlsCert?: string; tlsKey?: string } = {}) {
    dir ??= mkdtempSync(join(tmpdir(), 'phl-socket-'));
    const config = loadConfig(
      {},
      {
        dbFile: join(dir, 'db.sqlite'),
        host: '127.0.0.1',
        port: 0,
        seedDemo: false,
        logLevel: 'silent',
      },
    );
    const out = collector();
    const err = collector();
    const server = await serve(
      config,
      fixedClock('2026-03-05T09:30:00Z'), // invented fixed time
      { stdout: out.stream, stderr: err.stream },
      extra,
    );
    close = server.close;
    return { server, out, err };
  }

  it('prints a one-time set-up link that creates the admin, then signs in with cookies', async () => {
    dir = mkdtempSync(join(tmpdir(), 'phl-socket-'));
    const { server, out, err } = await start();
    expect(err.text()).toBe(''); // loopback: no exposure warning
    const link = /(http:\/\/127\.0\.0\.1:\d+\/setup\?token=[\w-]+)/.exec(out.text())?.[1];
    expect(link).toBeDefined();
    const token = new URL(link!).searchParams.get('token')!;

    const page = await fetch(link!);
    expect(page.status).toBe(200);
    expect(await page.text()).toContain('Create the clinic admin account');

    const anon = await fetch(`${server.address}/api/foods?q=milk`);
    expect(anon.status).toBe(401);

    const created = await fetch(`${server.address}/api/setup`, {
      method: 'POST',
      headers: { 'content-type': 'application/json' },
      body: JSON.stringify({ token, username: 'clinic-admin', password: 'a long admin password' }),
    });
    expect(created.status).toBe(201);
    // the link works once
    expect((await fetch(link!)).status).toBe(409);

    const signIn = await fetch(`${server.address}/api/session`, {
      method: 'POST',
      headers: { 'content-type': 'application/json' },
      body: JSON.stringify({ username: 'clinic-admin', password: 'a long admin password' }),
    });
    expect(signIn.status).toBe(200);
    const setCookie = signIn.headers.get('set-cookie')!;
    expect(setCookie).toMatch(/HttpOnly/);
    expect(setCookie).toMatch(/SameSite=Strict/);
    const cookie = setCookie.split(';')[0]!;
    const { csrfToken } = (await signIn.json()) as { csrfToken: string };

    const me = await fetch(`${server.address}/api/session`, { headers: { cookie } });
    expect(me.status).toBe(200);
    expect(((await me.json()) as { user: { role: string } }).user.role).toBe('admin');

    const out2 = await fetch(`${server.address}/api/session`, {
      method: 'DELETE',
      headers: { cookie, 'x-csrf-token': csrfToken },
    });
    expect(out2.status).toBe(200);
    expect((await fetch(`${server.address}/api/session`, { headers: { cookie } })).status).toBe(
      401,
    );
  });

  it.skipIf(!hasOpenssl)(
    'serves HTTPS with --tls-cert/--tls-key, Secure cookies and HSTS',
    async () => {
      dir = mkdtempSync(join(tmpdir(), 'phl-socket-'));
      const cert = join(dir, 'cert.pem');
      const key = join(dir, 'key.pem');
      execFileSync(
        'openssl',
        [
          'req',
          '-x509',
          '-newkey',
          'rsa:2048',
          '-nodes',
          '-keyout',
          key,
          '-out',
          cert,
          '-days',
          '1',
          '-subj',
          '/CN=127.0.0.1',
          '-addext',
          'subjectAltName=IP:127.0.0.1',
        ],
        { stdio: 'ignore' },
      );
      const { server, out } = await start({ tlsCert: cert, tlsKey: key });
      expect(server.address).toMatch(/^https:\/\/127\.0\.0\.1:/);
      const token = /setup\?token=([\w-]+)/.exec(out.text())![1]!;
      const url = new URL('/api/setup', server.address);
      const res = await new Promise<{ status: number; headers: Record<string, unknown> }>(
        (resolve, reject) => {
          const req = httpsRequest(
            url,
            {
              method: 'POST',
              ca: readFileSync(cert),
              headers: { 'content-type': 'application/json' },
            },
            (r) => {
              r.resume();
              r.on('end', () => resolve({ status: r.statusCode ?? 0, headers: r.headers }));
            },
          );
          req.on('error', reject);
          req.end(JSON.stringify({ token, username: 'boss', password: 'a long admin password' }));
        },
      );
      expect(res.status).toBe(201);
      expect(String(res.headers['set-cookie'])).toMatch(/; Secure/);
      expect(res.headers['strict-transport-security']).toBe('max-age=31536000; includeSubDomains');
    },
  );
});

describe('transport warnings (45 CFR 164.312(e)(1) transmission security)', () => {
  it('knows loopback addresses', () => {
    expect(['127.0.0.1', '127.1.2.3', 'localhost', '::1', '[::1]'].every(isLoopback)).toBe(true);
    expect(['0.0.0.0', '192.168.1.10', '::', 'example.org'].some(isLoopback)).toBe(false);
  });

  it('warns when binding beyond loopback without TLS, with how to fix it', () => {
    expect(exposureWarning('127.0.0.1', false)).toBeNull();
    expect(exposureWarning('0.0.0.0', true)).toBeNull();
    const w = exposureWarning('0.0.0.0', false)!;
    expect(w).toMatch(/without TLS/);
    expect(w).toMatch(/--tls-cert/);
    expect(w).toMatch(/proxy/);
  });
});
