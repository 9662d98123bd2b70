/**
 * The localhost host: the API table as POST /api/<operation>, and the built renderer as static
 * files. Binds 127.0.0.1 only; a random token per launch is required on every API call; the Host
 * header must name this server (against DNS rebinding); no CORS headers are ever sent.
 */
import { createServer, type IncomingMessage, type ServerResponse } from 'node:http';
import { randomBytes, timingSafeEqual } from 'node:crypto';
import { readFile } from 'node:fs/promises';
import { existsSync } from 'node:fs';
import { extname, join, resolve, sep } from 'node:path';
import type { AddressInfo } from 'node:net';
import { ApiError, OPERATIONS, type OperationName, type VeilApi } from '../app/api-contract.ts';

export interface HttpHost {
  url: string;
  port: number;
  token: string;
  close(): Promise<void>;
}

const MIME: Record<string, string> = {
  '.html': 'text/html; charset=utf-8', '.js': 'text/javascript; charset=utf-8', '.css': 'text/css; charset=utf-8',
  '.svg': 'image/svg+xml', '.png': 'image/png', '.json': 'application/json', '.woff2': 'font/woff2', '.ico': 'image/x-icon',
};

const SECURITY_HEADERS = {
  'X-Content-Type-Options': 'nosniff',
  'Referrer-Policy': 'no-referrer',
  'X-Frame-Options': 'DENY',
  'Content-Security-Policy': "default-src 'self'; script-src 'self'; style-src 'self' 'unsafe-inline'; img-src 'self' data: blob:; connect-src 'self'; frame-ancestors 'none'; base-uri 'none'; form-action 'none'",
};

function send(res: ServerResponse, status: number, body: string | Uint8Array, type: string): void {
  res.writeHead(status, { ...SECURITY_HEADERS, 'Content-Type': type, 'Cache-Control': 'no-store' });
  res.end(body);
}

function sendJson(res: ServerResponse, status: number, value: unknown): void {
  send(res, status, JSON.stringify(value), 'application/json; charset=utf-8');
}

async function readBody(req: IncomingMessage, limit: number): Promise<string> {
  const chunks: Buffer[] = [];
  let size = 0;
  for await (const c of req) {
    size += (c as Buffer).length;
    if (size > limit) throw new ApiError(`request body over ${limit} bytes`, 413);
    chunks.push(c as Buffer);
  }
  return Buffer.concat(chunks).toString('utf8');
}

export async function startHttpHost(api: VeilApi, opts: { port?: number; staticDir: string; token?: string }): Promise<HttpHost> {
  const token = opts.token ?? randomBytes(24).toString('base64url');
  const expected = Buffer.from(`Bearer ${token}`);
  const staticRoot = resolve(opts.staticDir);
  let port = 0;

  const tokenOk = (req: IncomingMessage) => {
    const got = Buffer.from(String(req.headers.authorization ?? ''));
    return got.length === expected.length && timingSafeEqual(got, expected);
  };
  const hostOk = (req: IncomingMessage) => {
    const h = String(req.headers.host ?? '').toLowerCase();
    return h === `127.0.0.1:${port}` || h === `localhost:${port}`;
  };

  const server = createServer(async (req, res) => {
    try {
      if (!hostOk(req)) return sendJson(res, 403, { error: 'Host header not allowed' });
      const url = new URL(req.url ?? '/', `http://127.0.0.1:${port}`);
      if (url.pathname.startsWith('/api/')) {
        if (req.method !== 'POST') return sendJson(res, 405, { error: 'API calls are POST' });
        if (!tokenOk(req)) return sendJson(res, 401, { error: 'missing or wrong token: open Veil through the URL it printed' });
        const op = url.pathname.slice('/api/'.length) as OperationName;
        if (!OPERATIONS.includes(op)) return sendJson(res, 404, { error: `no operation '${op}'` });
        const body = await readBody(req, 1 << 20);
        let arg: unknown = undefined;
        if (body) {
          try { arg = JSON.parse(body); } catch { throw new ApiError('request body is not JSON'); }
        }
        const result = await (api[op] as (a: unknown) => Promise<unknown>)(arg);
        if (result instanceof ArrayBuffer) return send(res, 200, new Uint8Array(result), 'application/octet-stream');
        return sendJson(res, 200, result ?? null);
      }
      if (req.method !== 'GET' && req.method !== 'HEAD') return sendJson(res, 405, { error: 'method not allowed' });
      const rel = url.pathname === '/' ? 'index.html' : decodeURIComponent(url.pathname.slice(1));
      const file = resolve(staticRoot, rel);
      if (file !== staticRoot && !file.startsWith(staticRoot + sep)) return sendJson(res, 403, { error: 'outside the app folder' });
      if (!existsSync(file)) return sendJson(res, 404, { error: 'not found' });
      return send(res, 200, await readFile(file), MIME[extname(file)] ?? 'application/octet-stream');
    } catch (e) {
      const status = e instanceof ApiError ? e.status : 500;
      if (status === 500) console.error(e);
      if (!res.headersSent) sendJson(res, status, { error: (e as Error).message });
      else res.end();
    }
  });
  await new Promise<void>((ok, fail) => {
    server.once('error', fail);
    server.listen(opts.port ?? 0, '127.0.0.1', () => ok());
  });
  port = (server.address() as AddressInfo).port;
  if (!existsSync(join(staticRoot, 'index.html'))) {
    console.warn(`warning: ${staticRoot} holds no built renderer; run \`npm run build\``);
  }
  return {
    url: `http://127.0.0.1:${port}/?token=${token}`,
    port,
    token,
    close: () => new Promise<void>((ok) => { server.closeAllConnections(); server.close(() => ok()); }),
  };
}
