// The loopback server as a browser or a hostile neighbour sees it: loopback binding, the API
// envelope over HTTP, static files with their types, and no way out of the static folder.
import { request } from 'node:http';
import { mkdtemp, mkdir, rm, symlink, writeFile } from 'node:fs/promises';
import os from 'node:os';
import path from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { httpClient } from '../../app/api/client';
import { LabError } from '../../app/api/errors';
import { startServer } from '../../app/server/server';
import type { RunningServer } from '../../app/server/server';
import { DEMO_ROWS, fakeLabApi } from './fixtures/fakeLab';

interface Answer {
  status: number;
  headers: Record<string, string | string[] | undefined>;
  body: string;
}

/** A raw request: the path goes out exactly as written (no URL normalisation by the client). */
function raw(
  port: number,
  method: string,
  rawPath: string,
  opts: { body?: string | Buffer; headers?: Record<string, string>; token?: string | null } = {},
): Promise<Answer> {
  // The server's token by default; null sends none.
  const token = opts.token === undefined ? TOKEN : opts.token;
  const headers = { ...(token === null ? {} : { 'x-dipledger-token': token }), ...opts.headers };
  return new Promise((resolve, reject) => {
    const req = request({ host: '127.0.0.1', port, method, path: rawPath, headers }, (res) => {
      const chunks: Buffer[] = [];
      res.on('data', (c: Buffer) => chunks.push(c));
      res.on('end', () =>
        resolve({
          status: res.statusCode ?? 0,
          headers: res.headers,
          body: Buffer.concat(chunks).toString('utf8'),
        }),
      );
    });
    req.on('error', reject);
    req.end(opts.body);
  });
}

const post = (port: number, op: string, body: unknown, type = 'application/json') =>
  raw(port, 'POST', `/api/${op}`, {
    body: typeof body === 'string' ? body : JSON.stringify(body),
    headers: { 'content-type': type },
  });

let dir: string;
let staticDir: string;
let server: RunningServer;
const SECRET = 'top-secret-outside-the-static-folder';
const TOKEN = 'fixed-test-token-0123456789abcdef';

beforeAll(async () => {
  dir = await mkdtemp(path.join(os.tmpdir(), 'dipledger-server-'));
  staticDir = path.join(dir, 'dist');
  await mkdir(path.join(staticDir, 'assets'), { recursive: true });
  await writeFile(path.join(staticDir, 'index.html'), '<!doctype html><title>t</title><p>register page</p>');
  await writeFile(path.join(staticDir, 'assets', 'app-1234.js'), 'console.log("app")');
  await writeFile(path.join(staticDir, 'assets', 'app-1234.css'), 'body{}');
  await writeFile(path.join(dir, 'secret.txt'), SECRET);
  await symlink(path.join(dir, 'secret.txt'), path.join(staticDir, 'leak.txt'));
  server = await startServer({ api: fakeLabApi(), staticDir, maxBodyBytes: 64 * 1024, token: TOKEN });
});

afterAll(async () => {
  await server?.close();
  await rm(dir, { recursive: true, force: true });
});

describe('binding', () => {
  it('listens on 127.0.0.1 only', () => {
    expect(server.host).toBe('127.0.0.1');
    expect(server.url).toBe(`http://127.0.0.1:${server.port}/`);
  });

  it('is not reachable on the machine’s other addresses', async () => {
    const external = Object.values(os.networkInterfaces())
      .flat()
      .find((a) => a && a.family === 'IPv4' && !a.internal);
    if (!external) return; // a loopback-only machine has nothing else to try
    const err = await new Promise<unknown>((resolve) => {
      const req = request(
        { host: external.address, port: server.port, path: '/api/health', timeout: 2000 },
        () => resolve(null),
      );
      req.on('error', resolve);
      req.on('timeout', () => req.destroy(new Error('timeout')));
      req.end();
    });
    expect(err).toBeInstanceOf(Error);
  });

  it('refuses to start on a non-loopback address', async () => {
    await expect(startServer({ api: fakeLabApi(), host: '0.0.0.0' })).rejects.toBeInstanceOf(LabError);
  });

  it('answers only its own Host names (DNS rebinding)', async () => {
    const evil = await raw(server.port, 'GET', '/api/health', {
      headers: { host: `evil.example:${server.port}` },
    });
    expect(evil.status).toBe(421);
    const local = await raw(server.port, 'GET', '/api/health', {
      headers: { host: `localhost:${server.port}` },
    });
    expect(local.status).toBe(200);
  });
});

describe('the per-launch token', () => {
  it('makes a random 256-bit one when none is given, and prints it in the launch address', async () => {
    const other = await startServer({ api: fakeLabApi() });
    try {
      expect(other.token).toMatch(/^[A-Za-z0-9_-]{43}$/);
      expect(other.launchUrl).toBe(`${other.url}?token=${other.token}`);
      expect(other.token).not.toBe(TOKEN);
    } finally {
      await other.close();
    }
  });

  it('refuses operations with a wrong or missing token, and says what to open', async () => {
    for (const token of [null, 'wrong-token-0123456789abcdef-xyz', `${TOKEN}x`]) {
      const res = await raw(server.port, 'POST', '/api/listMeters', {
        body: JSON.stringify({ args: [] }),
        headers: { 'content-type': 'application/json' },
        token,
      });
      expect(res.status, String(token)).toBe(401);
      expect(JSON.parse(res.body)).toMatchObject({ ok: false, error: { code: 'refused' } });
      expect(res.body).not.toContain('WM-');
    }
    const client = httpClient(server.url, fetch, 'wrong-token-0123456789abcdef-xyz');
    await expect(client.listMeters()).rejects.toThrow(/per-launch token/);
  });

  it('refuses the page itself without the token, and a wrong token in the address', async () => {
    const bare = await raw(server.port, 'GET', '/', { token: null });
    expect(bare.status).toBe(401);
    expect(bare.body).not.toContain('register page');
    const wrong = await raw(server.port, 'GET', '/?token=not-the-token-at-all-0123456', { token: null });
    expect(wrong.status).toBe(401);
    expect(wrong.headers['set-cookie']).toBeUndefined();
  });

  it('trades the token in the address for a strict cookie and sends the browser on without it', async () => {
    const first = await raw(server.port, 'GET', `/?token=${TOKEN}`, { token: null });
    expect(first.status).toBe(303);
    expect(first.headers.location).toBe('/');
    const cookie = String(first.headers['set-cookie']);
    expect(cookie).toContain(`dipledger_${server.port}=${TOKEN}`);
    expect(cookie).toContain('HttpOnly');
    expect(cookie).toContain('SameSite=Strict');
    const page = await raw(server.port, 'GET', '/', {
      token: null,
      headers: { cookie: `other=1; dipledger_${server.port}=${TOKEN}` },
    });
    expect(page.status).toBe(200);
    expect(page.body).toContain('register page');
    const api = await raw(server.port, 'POST', '/api/listMeters', {
      body: JSON.stringify({ args: [] }),
      headers: { 'content-type': 'application/json', cookie: `dipledger_${server.port}=${TOKEN}` },
      token: null,
    });
    expect(api.status).toBe(200);
  });

  it('refuses requests from other sites even with the token', async () => {
    for (const headers of [
      { origin: 'http://evil.example' } as Record<string, string>,
      { origin: `http://127.0.0.1:${server.port + 1}` },
      { 'sec-fetch-site': 'cross-site' },
    ]) {
      const res = await raw(server.port, 'POST', '/api/listMeters', {
        body: JSON.stringify({ args: [] }),
        headers: { 'content-type': 'application/json', ...headers },
      });
      expect(res.status, JSON.stringify(headers)).toBe(403);
    }
    const own = await raw(server.port, 'POST', '/api/listMeters', {
      body: JSON.stringify({ args: [] }),
      headers: { 'content-type': 'application/json', origin: `http://127.0.0.1:${server.port}` },
    });
    expect(own.status).toBe(200);
  });

  it('answers the health probe without a token, and nothing else with it', async () => {
    expect((await raw(server.port, 'GET', '/api/health', { token: null })).status).toBe(200);
  });
});

describe('API', () => {
  it('GET /api/health', async () => {
    const res = await fetch(`${server.url}api/health`);
    expect(res.status).toBe(200);
    expect(await res.json()).toEqual({ ok: true, value: { status: 'ok', service: 'dipledger' } });
  });

  it('POST /api/listMeters returns the rows in the envelope', async () => {
    const res = await post(server.port, 'listMeters', { args: [] });
    expect(res.status).toBe(200);
    expect(res.headers['content-type']).toBe('application/json; charset=utf-8');
    expect(JSON.parse(res.body)).toEqual({ ok: true, value: DEMO_ROWS });
  });

  it('works through httpClient, errors included', async () => {
    const client = httpClient(server.url, fetch, server.token);
    expect(await client.listMeters()).toEqual(DEMO_ROWS);
    await expect(client.getMeter('WM-999')).rejects.toMatchObject({ code: 'not-found' });
  });

  it('maps error codes to HTTP statuses', async () => {
    expect((await post(server.port, 'getMeter', { args: ['WM-999'] })).status).toBe(404);
    expect((await post(server.port, 'recordCheck', { args: [{}] })).status).toBe(422);
  });

  it('refuses unknown operations, missing args and bad JSON with 400 and an envelope', async () => {
    for (const [op, body] of [
      ['dropAll', { args: [] }],
      ['__proto__', { args: [] }],
      ['listMeters', {}],
      ['listMeters', '{"args": ['],
      ['listMeters', 'null'],
    ] as const) {
      const res = await post(server.port, op, body);
      expect(res.status, `${op} ${JSON.stringify(body)}`).toBe(400);
      expect(JSON.parse(res.body)).toMatchObject({ ok: false, error: { code: 'invalid-input' } });
    }
  });

  it('accepts JSON only (no cross-site simple requests)', async () => {
    const res = await post(server.port, 'listMeters', { args: [] }, 'text/plain');
    expect(res.status).toBe(415);
  });

  it('allows only POST on operations', async () => {
    const res = await raw(server.port, 'GET', '/api/listMeters');
    expect(res.status).toBe(405);
    expect(res.headers.allow).toBe('POST');
  });

  it('answers 413 to an oversized body, declared or streamed', async () => {
    const big = JSON.stringify({ args: ['x'.repeat(100 * 1024)] });
    const declared = await post(server.port, 'importCsv', big);
    expect(declared.status).toBe(413);
    expect(JSON.parse(declared.body)).toMatchObject({ ok: false, error: { code: 'invalid-input' } });
    // Chunked, so the size is only known while reading.
    const streamed = await raw(server.port, 'POST', '/api/importCsv', {
      body: Buffer.from(big),
      headers: { 'content-type': 'application/json', 'transfer-encoding': 'chunked' },
    }).catch((e: unknown) => e);
    if (!(streamed instanceof Error)) expect((streamed as Answer).status).toBe(413);
    // And the server still serves afterwards.
    expect((await raw(server.port, 'GET', '/api/health')).status).toBe(200);
  });
});

describe('static files', () => {
  it('serves the page with its type and a content security policy', async () => {
    const res = await raw(server.port, 'GET', '/');
    expect(res.status).toBe(200);
    expect(res.headers['content-type']).toBe('text/html; charset=utf-8');
    expect(res.headers['content-security-policy']).toContain("default-src 'self'");
    expect(res.body).toContain('register page');
  });

  it('serves assets with their types, long-cached', async () => {
    const js = await raw(server.port, 'GET', '/assets/app-1234.js');
    expect(js.headers['content-type']).toBe('text/javascript; charset=utf-8');
    expect(js.headers['cache-control']).toContain('immutable');
    expect((await raw(server.port, 'GET', '/assets/app-1234.css')).headers['content-type']).toBe(
      'text/css; charset=utf-8',
    );
    expect((await raw(server.port, 'GET', '/assets/missing.js')).status).toBe(404);
  });

  it('gives the page for unknown routes a browser navigates to', async () => {
    const res = await raw(server.port, 'GET', '/meters/WM-003', { headers: { accept: 'text/html' } });
    expect(res.status).toBe(200);
    expect(res.body).toContain('register page');
  });

  it('refuses path traversal in every spelling', async () => {
    for (const p of [
      '/../secret.txt',
      '/assets/../../secret.txt',
      '/%2e%2e/secret.txt',
      '/..%2fsecret.txt',
      '/assets/..%2f..%2fsecret.txt',
      '/..%5csecret.txt',
      '/%2e%2e%5csecret.txt',
      '/secret.txt%00.html',
      '/leak.txt',
      '//etc/passwd',
      '/%2fetc%2fpasswd',
    ]) {
      const res = await raw(server.port, 'GET', p);
      expect(res.status, p).not.toBe(200);
      expect(res.body, p).not.toContain(SECRET);
      expect(res.body, p).not.toContain('root:');
    }
  });

  it('refuses methods other than GET and HEAD', async () => {
    expect((await raw(server.port, 'DELETE', '/index.html')).status).toBe(405);
    const head = await raw(server.port, 'HEAD', '/index.html');
    expect(head.status).toBe(200);
    expect(head.body).toBe('');
  });
});
