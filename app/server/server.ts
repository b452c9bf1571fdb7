// Loopback HTTP bridge to a LabApi for browser mode and end-to-end tests: POST /api/<op>
// runs one operation, GET serves the built renderer. Transport only, no domain logic.
// Every request but /api/health needs the random per-launch token: any other program or web page
// on this machine can reach 127.0.0.1, and the lab's records are not theirs to read or write.
// The browser brings it once in the printed address (?token=...), gets it back as an HttpOnly,
// SameSite=Strict cookie and is sent to the address without it; other clients send a header.
import { randomBytes, timingSafeEqual } from 'node:crypto';
import { createServer } from 'node:http';
import type { IncomingMessage, ServerResponse } from 'node:http';
import type { AddressInfo } from 'node:net';
import { open, realpath } from 'node:fs/promises';
import path from 'node:path';
import type { LabApi } from '../api/contract';
import { LabError, toWire } from '../api/errors';
import type { LabErrorCode } from '../api/errors';
import { dispatch, decodeWire, encodeWire } from '../api/transport';
import type { Envelope } from '../api/transport';

export interface ServerOptions {
  api: LabApi;
  /** 0 picks a free port. */
  port?: number;
  /** Loopback only: '127.0.0.1' (default), '::1' or 'localhost'. */
  host?: string;
  /** The built renderer (renderer/dist). Without it only /api is served. */
  staticDir?: string;
  /** Largest request body accepted, bytes (default 20 MB: a big CSV history import). */
  maxBodyBytes?: number;
  /** The per-launch secret; a random 256-bit one when left out (tests may fix it). */
  token?: string;
}

export interface RunningServer {
  /** The base address, e.g. http://127.0.0.1:5317/ (refuses everything but /api/health alone). */
  url: string;
  /** The address to open in a browser: the base address with the token. */
  launchUrl: string;
  /** Send as the `x-dipledger-token` header (programs) or bring once as ?token= (browsers). */
  token: string;
  /** The address actually bound, e.g. '127.0.0.1'. */
  host: string;
  port: number;
  close(): Promise<void>;
}

const LOOPBACK = new Set(['127.0.0.1', '::1', 'localhost']);

const STATUS: Record<LabErrorCode, number> = {
  'invalid-input': 400,
  'not-found': 404,
  conflict: 409,
  refused: 422,
  busy: 503,
  internal: 500,
};

const TYPES: Record<string, string> = {
  '.html': 'text/html; charset=utf-8',
  '.js': 'text/javascript; charset=utf-8',
  '.mjs': 'text/javascript; charset=utf-8',
  '.css': 'text/css; charset=utf-8',
  '.json': 'application/json; charset=utf-8',
  '.map': 'application/json; charset=utf-8',
  '.svg': 'image/svg+xml',
  '.png': 'image/png',
  '.ico': 'image/x-icon',
  '.woff2': 'font/woff2',
  '.txt': 'text/plain; charset=utf-8',
};

// The page loads only its own files; nothing inline, nothing from elsewhere.
const CSP =
  "default-src 'self'; script-src 'self'; style-src 'self'; img-src 'self' data:; connect-src 'self'; " +
  "object-src 'none'; base-uri 'none'; form-action 'none'; frame-ancestors 'none'";

class HttpRefusal extends Error {
  constructor(
    readonly status: number,
    message: string,
  ) {
    super(message);
  }
}

export async function startServer(options: ServerOptions): Promise<RunningServer> {
  const { api, port = 0, host = '127.0.0.1', staticDir, maxBodyBytes = 20 * 1024 * 1024 } = options;
  // Anything else would publish the lab records to the network.
  if (!LOOPBACK.has(host))
    throw new LabError('refused', `the lab server listens on loopback only, not on ${host}`);
  const root = staticDir ? path.resolve(staticDir) : undefined;
  const token = options.token ?? randomBytes(32).toString('base64url');
  if (token.length < 16 || !/^[A-Za-z0-9_-]+$/.test(token))
    throw new LabError('invalid-input', 'the server token must be at least 16 URL-safe characters');
  let boundPort = port;
  /** Per port, so two labs served side by side keep their own cookie (cookies ignore ports). */
  const cookieName = () => `dipledger_${boundPort}`;

  const server = createServer((req, res) => {
    handle(req, res).catch((e: unknown) => {
      // Last resort: the handler itself failed; answer once, never crash the process.
      if (!res.headersSent) sendJson(res, 500, { ok: false, error: toWire(e) });
      else res.destroy();
    });
  });

  async function handle(req: IncomingMessage, res: ServerResponse): Promise<void> {
    // DNS-rebinding guard: a web page from elsewhere must not reach the lab through a name
    // that resolves to 127.0.0.1; only our own loopback host names are answered.
    if (!hostAllowed(req.headers.host, boundPort)) {
      sendText(res, 421, 'unexpected Host header');
      return;
    }
    const url = new URL(req.url ?? '/', 'http://loopback');
    if (url.pathname === '/api/health') {
      if (req.method !== 'GET' && req.method !== 'HEAD') return methodNotAllowed(res, 'GET');
      sendJson(res, 200, { ok: true, value: { status: 'ok', service: 'dipledger' } });
      return;
    }
    // Cross-site requests: a page from elsewhere that a browser would let through anyway.
    if (!originAllowed(req, boundPort)) {
      if (url.pathname.startsWith('/api/'))
        sendEnvelope(res, 403, refusal('refused', 'requests from other sites are refused'));
      else sendText(res, 403, 'requests from other sites are refused');
      return;
    }
    const offered = url.searchParams.get('token');
    if (
      offered !== null &&
      (req.method === 'GET' || req.method === 'HEAD') &&
      !url.pathname.startsWith('/api/')
    ) {
      if (!sameSecret(offered, token)) {
        sendText(res, 401, NEEDS_TOKEN);
        return;
      }
      // The token leaves the address bar and history; the cookie carries it from now on.
      url.searchParams.delete('token');
      res.writeHead(303, {
        location: url.pathname + (url.search === '?' ? '' : url.search),
        'set-cookie': `${cookieName()}=${token}; HttpOnly; SameSite=Strict; Path=/`,
        'cache-control': 'no-store',
      });
      res.end();
      return;
    }
    if (!authorised(req)) {
      if (url.pathname.startsWith('/api/')) sendEnvelope(res, 401, refusal('refused', NEEDS_TOKEN));
      else sendText(res, 401, NEEDS_TOKEN);
      return;
    }
    if (url.pathname.startsWith('/api/')) {
      if (req.method !== 'POST') return methodNotAllowed(res, 'POST');
      await handleApi(req, res, url.pathname.slice('/api/'.length));
      return;
    }
    if (req.method !== 'GET' && req.method !== 'HEAD') return methodNotAllowed(res, 'GET, HEAD');
    await serveStatic(req, res, url.pathname);
  }

  function authorised(req: IncomingMessage): boolean {
    const header = req.headers['x-dipledger-token'];
    if (typeof header === 'string') return sameSecret(header, token);
    const cookie = cookieValue(req.headers.cookie, cookieName());
    return cookie !== undefined && sameSecret(cookie, token);
  }

  async function handleApi(req: IncomingMessage, res: ServerResponse, op: string): Promise<void> {
    // JSON only: a cross-site form or "simple" request cannot send this type without a
    // CORS preflight, which this server never grants.
    const type = (req.headers['content-type'] ?? '').split(';')[0]?.trim().toLowerCase();
    if (type !== 'application/json') {
      sendEnvelope(res, 415, refusal('invalid-input', 'send the arguments as application/json'));
      return;
    }
    let text: string;
    try {
      text = await readBody(req, maxBodyBytes);
    } catch (e) {
      if (e instanceof HttpRefusal) {
        sendEnvelope(res, e.status, refusal('invalid-input', e.message), true);
        return;
      }
      throw e;
    }
    let body: unknown;
    try {
      body = decodeWire(text);
    } catch {
      sendEnvelope(res, 400, refusal('invalid-input', 'the request body is not valid JSON'));
      return;
    }
    const args = typeof body === 'object' && body !== null ? (body as { args?: unknown }).args : undefined;
    const envelope = await dispatch(api, decodeURIComponentSafe(op), args);
    sendEnvelope(res, envelope.ok ? 200 : STATUS[envelope.error.code], envelope);
  }

  async function serveStatic(req: IncomingMessage, res: ServerResponse, pathname: string): Promise<void> {
    if (!root) {
      sendText(res, 404, 'The renderer is not built: run "npm run build:renderer".');
      return;
    }
    const decoded = decodeURIComponentSafe(pathname);
    // Refuse rather than normalise: "..", backslashes and NULs have no business in our URLs.
    if (
      decoded === undefined ||
      decoded.includes('\0') ||
      decoded.includes('\\') ||
      decoded.split('/').includes('..')
    ) {
      sendText(res, 400, 'bad path');
      return;
    }
    const relative = decoded === '/' ? 'index.html' : decoded.replace(/^\/+/, '');
    const file = await resolveInside(root, relative);
    if (!file) {
      // One-page app: unknown routes without an extension get the page; missing assets 404.
      if (path.extname(relative) === '' && (req.headers.accept ?? '').includes('text/html')) {
        const index = await resolveInside(root, 'index.html');
        if (index) return sendFile(req, res, index);
      }
      sendText(res, 404, 'not found');
      return;
    }
    await sendFile(req, res, file);
  }

  await new Promise<void>((resolve, reject) => {
    server.once('error', reject);
    server.listen({ port, host, exclusive: true }, () => {
      server.off('error', reject);
      resolve();
    });
  });
  const address = server.address() as AddressInfo;
  boundPort = address.port;
  const shownHost = host === '::1' ? '[::1]' : host;

  const base = `http://${shownHost}:${boundPort}/`;
  return {
    url: base,
    launchUrl: `${base}?token=${token}`,
    token,
    host: address.address,
    port: boundPort,
    close: () =>
      new Promise<void>((resolve, reject) => {
        server.close((e) => (e ? reject(e) : resolve()));
        server.closeAllConnections();
      }),
  };
}

const NEEDS_TOKEN =
  'This lab server needs its per-launch token: open the address Dipledger printed when it started (the one with ?token=).';

/** Constant-time comparison, so the token cannot be guessed a character at a time. */
function sameSecret(offered: string, token: string): boolean {
  const a = Buffer.from(offered);
  const b = Buffer.from(token);
  return a.length === b.length && timingSafeEqual(a, b);
}

function cookieValue(header: string | undefined, name: string): string | undefined {
  for (const part of (header ?? '').split(';')) {
    const eq = part.indexOf('=');
    if (eq > 0 && part.slice(0, eq).trim() === name) return part.slice(eq + 1).trim();
  }
  return undefined;
}

/** A request a browser marks as coming from another site, or whose Origin is not this server. */
function originAllowed(req: IncomingMessage, port: number): boolean {
  const site = req.headers['sec-fetch-site'];
  if (site === 'cross-site' || site === 'same-site') return false;
  const origin = req.headers.origin;
  if (origin === undefined) return true;
  return [`http://127.0.0.1:${port}`, `http://localhost:${port}`, `http://[::1]:${port}`].includes(
    origin.toLowerCase(),
  );
}

function hostAllowed(hostHeader: string | undefined, port: number): boolean {
  if (!hostHeader) return false;
  const allowed = [`127.0.0.1:${port}`, `localhost:${port}`, `[::1]:${port}`];
  return allowed.includes(hostHeader.toLowerCase());
}

function decodeURIComponentSafe(s: string): string | undefined {
  try {
    return decodeURIComponent(s);
  } catch {
    return undefined;
  }
}

/** The real path of `relative` under `root`, or undefined if missing, not a file, or outside root (symlinks too). */
async function resolveInside(root: string, relative: string): Promise<string | undefined> {
  try {
    const realRoot = await realpath(root);
    const real = await realpath(path.resolve(realRoot, relative));
    if (!real.startsWith(realRoot + path.sep)) return undefined;
    return real;
  } catch {
    return undefined;
  }
}

async function sendFile(req: IncomingMessage, res: ServerResponse, file: string): Promise<void> {
  const handle = await open(file, 'r');
  try {
    const info = await handle.stat();
    if (!info.isFile()) {
      sendText(res, 404, 'not found');
      return;
    }
    const ext = path.extname(file).toLowerCase();
    const headers: Record<string, string | number> = {
      'content-type': TYPES[ext] ?? 'application/octet-stream',
      'content-length': info.size,
      'x-content-type-options': 'nosniff',
      // Vite names assets by content hash, so they never change; the page itself may.
      'cache-control': file.includes(`${path.sep}assets${path.sep}`)
        ? 'public, max-age=31536000, immutable'
        : 'no-cache',
    };
    if (ext === '.html') {
      headers['content-security-policy'] = CSP;
      headers['x-frame-options'] = 'DENY';
      headers['referrer-policy'] = 'no-referrer';
    }
    res.writeHead(200, headers);
    if (req.method === 'HEAD') {
      res.end();
      return;
    }
    res.end(await handle.readFile());
  } finally {
    await handle.close();
  }
}

function readBody(req: IncomingMessage, limit: number): Promise<string> {
  return new Promise((resolve, reject) => {
    const declared = Number(req.headers['content-length']);
    if (Number.isFinite(declared) && declared > limit) {
      reject(new HttpRefusal(413, `the request is larger than ${Math.round(limit / 1048576)} MB`));
      return;
    }
    const chunks: Buffer[] = [];
    let size = 0;
    let failed = false;
    req.on('data', (chunk: Buffer) => {
      if (failed) return;
      size += chunk.length;
      if (size > limit) {
        failed = true;
        reject(new HttpRefusal(413, `the request is larger than ${Math.round(limit / 1048576)} MB`));
        return;
      }
      chunks.push(chunk);
    });
    req.on('end', () => {
      if (failed) return;
      try {
        resolve(new TextDecoder('utf-8', { fatal: true }).decode(Buffer.concat(chunks)));
      } catch {
        reject(new HttpRefusal(400, 'the request body is not UTF-8 text'));
      }
    });
    req.on('error', (e) => {
      if (!failed) reject(e);
    });
  });
}

function refusal(code: LabErrorCode, message: string): Envelope<never> {
  return { ok: false, error: { code, message, issues: [] } };
}

function methodNotAllowed(res: ServerResponse, allow: string): void {
  res.setHeader('allow', allow);
  sendText(res, 405, 'method not allowed');
}

function sendEnvelope(res: ServerResponse, status: number, envelope: Envelope, closeAfter = false): void {
  // After an oversized body we stop reading; close so the client is not left mid-upload.
  if (closeAfter) res.setHeader('connection', 'close');
  sendJson(res, status, envelope);
}

function sendJson(res: ServerResponse, status: number, body: unknown): void {
  const text = encodeWire(body);
  res.writeHead(status, {
    'content-type': 'application/json; charset=utf-8',
    'content-length': Buffer.byteLength(text),
    'cache-control': 'no-store',
    'x-content-type-options': 'nosniff',
  });
  res.end(text);
}

function sendText(res: ServerResponse, status: number, text: string): void {
  res.writeHead(status, {
    'content-type': 'text/plain; charset=utf-8',
    'content-length': Buffer.byteLength(text),
    'x-content-type-options': 'nosniff',
  });
  res.end(text);
}
