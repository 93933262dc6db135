/**
 * The office server: `npm run office -- [--port 8750] [--host 127.0.0.1] [--data .office-data] [--dist dist]`.
 *
 * Serves the built field app from dist/ (so tablets can install it from the
 * office) and the sync API under /api/v1/ (protocol: core/exchange/sync-protocol.ts).
 * Listens on 127.0.0.1 unless --host says otherwise. Every API call needs
 * `Authorization: Bearer TOKEN` (a token from `shearfield device add`);
 * without a valid one the answer is 401 and nothing is read or written.
 * Errors are one JSON object `{"error": "a sentence"}`; stack traces never
 * leave the process.
 */
import { createReadStream, existsSync, statSync } from 'node:fs';
import { createServer, type IncomingMessage, type Server, type ServerResponse } from 'node:http';
import { extname, join, normalize, resolve, sep } from 'node:path';
import { pathToFileURL } from 'node:url';
import { parseArgs } from 'node:util';
import { InputError } from '../core/shared/errors';
import {
  API_PREFIX,
  MAX_PUSH_BYTES,
  PROTOCOL_VERSION,
  type PullResponse,
  type PushResponse,
  type StatusResponse,
} from '../core/exchange/sync-protocol';
import { checkPullQuery, checkPushBody } from '../core/exchange/sync-protocol-check';
import { DEFAULT_DATA_DIR, isBusyError, OfficeStore } from './store';

/** Defaults of `npm run office`. */
export const DEFAULT_PORT = 8750;
export const DEFAULT_HOST = '127.0.0.1';
export const DEFAULT_DIST_DIR = 'dist';

export interface OfficeServerOptions {
  /** TCP port; 0 picks a free one. @default 8750 */
  port?: number;
  /** Interface to listen on. @default '127.0.0.1' (this machine only) */
  host?: string;
  /** Data folder holding the SQLite store. @default '.office-data' */
  dataDir?: string;
  /** Built app to serve. @default 'dist' */
  distDir?: string;
  /** How long a push waits for another writer before answering 503, ms. @default DEFAULT_WRITE_WAIT_MS */
  writeWaitMs?: number;
}

export interface RunningOffice {
  server: Server;
  store: OfficeStore;
  url: string;
  /** True when dist/ holds a built app. */
  appBuilt: boolean;
  close(): Promise<void>;
}

class HttpError extends Error {
  constructor(
    readonly status: number,
    message: string,
    readonly headers: Record<string, string> = {},
  ) {
    super(message);
  }
}

const MIME: Record<string, string> = {
  '.html': 'text/html; charset=utf-8',
  '.js': 'text/javascript; charset=utf-8',
  '.mjs': 'text/javascript; charset=utf-8',
  '.css': 'text/css; charset=utf-8',
  '.json': 'application/json; charset=utf-8',
  '.webmanifest': 'application/manifest+json; charset=utf-8',
  '.svg': 'image/svg+xml',
  '.png': 'image/png',
  '.ico': 'image/x-icon',
  '.woff2': 'font/woff2',
  '.txt': 'text/plain; charset=utf-8',
  '.wasm': 'application/wasm',
};

const CORS_HEADERS = {
  'Access-Control-Allow-Origin': '*',
  'Access-Control-Allow-Headers': 'Authorization, Content-Type',
  'Access-Control-Allow-Methods': 'GET, POST, OPTIONS',
  'Access-Control-Max-Age': '600',
};

function sendJson(res: ServerResponse, status: number, body: unknown, extra: Record<string, string> = {}): void {
  const text = JSON.stringify(body);
  res.writeHead(status, {
    'Content-Type': 'application/json; charset=utf-8',
    'Content-Length': Buffer.byteLength(text),
    'Cache-Control': 'no-store',
    'X-Content-Type-Options': 'nosniff',
    ...CORS_HEADERS,
    ...extra,
  });
  res.end(text);
}

/**
 * Reads the body up to `limit` bytes. A larger one is a 413: the rest is
 * read and thrown away (so the client can read the answer), up to 4 × the
 * limit, beyond which the connection is cut.
 */
function readBody(req: IncomingMessage, limit: number): Promise<Buffer> {
  return new Promise((resolveBody, reject) => {
    const tooBig = () =>
      new HttpError(413, `The request body is larger than the ${limit}-byte limit (${Math.round(limit / 1048576)} MiB); send the changes in smaller batches. Nothing was saved.`);
    const chunks: Buffer[] = [];
    let size = 0;
    let over = Number(req.headers['content-length']) > limit;
    req.on('data', (chunk: Buffer) => {
      size += chunk.length;
      if (size > limit) over = true;
      if (over) {
        chunks.length = 0;
        if (size > 4 * limit) req.destroy();
        return;
      }
      chunks.push(chunk);
    });
    req.on('end', () => (over ? reject(tooBig()) : resolveBody(Buffer.concat(chunks))));
    req.on('error', reject);
    req.on('close', () => {
      if (!req.complete) reject(over ? tooBig() : new HttpError(400, 'The request body was cut off; nothing was saved.'));
    });
  });
}

function bearer(req: IncomingMessage): string | undefined {
  const h = req.headers.authorization;
  if (typeof h !== 'string') return undefined;
  const m = /^Bearer\s+(\S+)\s*$/i.exec(h);
  return m ? m[1] : undefined;
}

function notBuiltPage(distDir: string): string {
  return `<!doctype html><meta charset="utf-8"><title>Shearfield office</title>
<p>The field app is not built yet (no ${distDir}/index.html). Run <code>npm run build</code> in the Shearfield folder, then restart the office server. The sync API works meanwhile.</p>`;
}

/** How long a push waits for another writer (a bundle import, say) before the answer is 503, ms. */
export const DEFAULT_WRITE_WAIT_MS = 20_000;
/** The server's SQLite busy timeout, ms: short, because it blocks every request; longer waits retry without blocking. */
const SERVER_BUSY_TIMEOUT_MS = 50;
/** Retry-After of a 503 when the store stayed busy, s. */
const BUSY_RETRY_AFTER_S = 5;

/**
 * Runs a store write, retrying while another process holds the write lock
 * (SQLITE_BUSY), with pauses that leave the event loop free, for at most
 * `budgetMs`; then a 503 with Retry-After. Nothing is written by a failed try.
 */
async function whenStoreFree<T>(write: () => T, budgetMs: number): Promise<T> {
  const deadline = Date.now() + budgetMs;
  for (let pause = 10; ; pause = Math.min(pause * 2, 250)) {
    try {
      return write();
    } catch (e) {
      if (!isBusyError(e)) throw e;
      if (Date.now() + pause > deadline) {
        throw new HttpError(
          503,
          `The office store stayed busy with another writer (a bundle import or another push) for ${Math.round(budgetMs / 1000)} s; nothing was saved. Try again in ${BUSY_RETRY_AFTER_S} s.`,
          { 'Retry-After': String(BUSY_RETRY_AFTER_S) },
        );
      }
      await new Promise((ok) => setTimeout(ok, pause));
    }
  }
}

async function handleApi(req: IncomingMessage, res: ServerResponse, url: URL, store: OfficeStore, writeWaitMs: number): Promise<void> {
  // Authentication comes first: without a valid token nothing is read or written.
  const token = bearer(req);
  const device = token === undefined ? undefined : store.authenticate(token);
  if (!device) {
    req.resume();
    sendJson(
      res,
      401,
      { error: token === undefined ? 'This request needs a device token: send the header "Authorization: Bearer TOKEN".' : 'The device token is not valid or has been revoked; ask the office for a new one.' },
      { 'WWW-Authenticate': 'Bearer realm="shearfield-office"' },
    );
    return;
  }
  const path = url.pathname.slice(API_PREFIX.length);
  if (path === '/status' && req.method === 'GET') {
    const counts = store.counts();
    const body: StatusResponse = {
      server: 'shearfield-office',
      protocol: PROTOCOL_VERSION,
      device: device.name,
      records: counts.records,
      conflicts: counts.conflicts,
      cursor: String(store.cursor()),
    };
    sendJson(res, 200, body);
    return;
  }
  if (path === '/push' && req.method === 'POST') {
    const raw = await readBody(req, MAX_PUSH_BYTES);
    let data: unknown;
    try {
      data = JSON.parse(raw.toString('utf8'));
    } catch {
      throw new HttpError(400, 'The request body is not valid JSON; nothing was saved.');
    }
    const push = checkPushBody(data);
    const result = await whenStoreFree(() => store.applyBatch(push.records, { batchId: push.batchId, source: device.name, deviceId: device.id }), writeWaitMs);
    const conflictIds = new Set(result.plan.outcomes.filter((o) => o.action === 'conflict').map((o) => o.id));
    const body: PushResponse = {
      batchId: push.batchId,
      replay: result.replay,
      accepted: result.plan.accepted,
      ignored: result.plan.ignored,
      conflicts: result.plan.conflicts,
      outcomes: result.plan.outcomes,
      conflicted: [...conflictIds].map((id) => store.get(id)!),
      cursor: String(result.cursor),
    };
    sendJson(res, 200, body);
    return;
  }
  if (path === '/pull' && req.method === 'GET') {
    const q = checkPullQuery(url.searchParams);
    const page = store.pull(q.since, q.limit);
    const body: PullResponse = { records: page.records, cursor: String(page.cursor), more: page.more, seqs: page.seqs.map(String) };
    sendJson(res, 200, body);
    return;
  }
  req.resume();
  if (path === '/status' || path === '/push' || path === '/pull') {
    throw new HttpError(405, `${req.method} is not allowed on ${url.pathname}.`);
  }
  throw new HttpError(404, `There is no API at ${url.pathname}; the sync API has ${API_PREFIX}/status, ${API_PREFIX}/push and ${API_PREFIX}/pull.`);
}

function serveApp(req: IncomingMessage, res: ServerResponse, url: URL, distDir: string): void {
  if (req.method !== 'GET' && req.method !== 'HEAD') {
    res.writeHead(405, { 'Content-Type': 'text/plain; charset=utf-8', Allow: 'GET, HEAD' }).end('Only GET and HEAD are served here.\n');
    return;
  }
  const root = resolve(distDir);
  if (!existsSync(join(root, 'index.html'))) {
    res.writeHead(503, { 'Content-Type': 'text/html; charset=utf-8', 'Cache-Control': 'no-store' }).end(notBuiltPage(distDir));
    return;
  }
  let rel: string;
  try {
    rel = decodeURIComponent(url.pathname);
  } catch {
    res.writeHead(400, { 'Content-Type': 'text/plain; charset=utf-8' }).end('The address is not valid.\n');
    return;
  }
  let file = normalize(join(root, rel));
  if (file !== root && !file.startsWith(root + sep)) {
    res.writeHead(404, { 'Content-Type': 'text/plain; charset=utf-8' }).end('Not found.\n');
    return;
  }
  let exists = existsSync(file) && statSync(file).isFile();
  if (!exists && extname(rel) === '') {
    // An app route: the app's page handles it.
    file = join(root, 'index.html');
    exists = true;
  }
  if (!exists) {
    res.writeHead(404, { 'Content-Type': 'text/plain; charset=utf-8' }).end('Not found.\n');
    return;
  }
  const name = file.slice(root.length + 1);
  const fresh = name === 'index.html' || name === 'sw.js' || name.endsWith('.webmanifest') || name.startsWith('workbox-') || name === 'registerSW.js';
  res.writeHead(200, {
    'Content-Type': MIME[extname(file).toLowerCase()] ?? 'application/octet-stream',
    'Content-Length': statSync(file).size,
    'Cache-Control': fresh ? 'no-cache' : name.startsWith('assets/') ? 'public, max-age=31536000, immutable' : 'public, max-age=3600',
    'X-Content-Type-Options': 'nosniff',
  });
  if (req.method === 'HEAD') {
    res.end();
    return;
  }
  createReadStream(file).pipe(res);
}

/** Starts the office server; resolves once it listens. */
export async function startOfficeServer(options: OfficeServerOptions = {}): Promise<RunningOffice> {
  const port = options.port ?? DEFAULT_PORT;
  const host = options.host ?? DEFAULT_HOST;
  const distDir = options.distDir ?? DEFAULT_DIST_DIR;
  const store = OfficeStore.open(options.dataDir ?? DEFAULT_DATA_DIR, { create: true, busyTimeoutMs: SERVER_BUSY_TIMEOUT_MS });
  const server = createServer((req, res) => {
    let url: URL;
    try {
      url = new URL(req.url ?? '/', 'http://office.invalid');
    } catch {
      sendJson(res, 400, { error: 'The request address is not valid.' });
      return;
    }
    if (!url.pathname.startsWith(API_PREFIX + '/') && url.pathname !== API_PREFIX) {
      serveApp(req, res, url, distDir);
      return;
    }
    if (req.method === 'OPTIONS') {
      res.writeHead(204, CORS_HEADERS).end();
      return;
    }
    handleApi(req, res, url, store, options.writeWaitMs ?? DEFAULT_WRITE_WAIT_MS).catch((e: unknown) => {
      if (e instanceof HttpError) {
        if (!res.headersSent && !res.destroyed) sendJson(res, e.status, { error: e.message }, e.headers);
      } else if (e instanceof InputError) {
        sendJson(res, 400, { error: `${e.message} Nothing was saved.`, field: e.field });
      } else {
        // The details go to the office log only, never to the client.
        console.error(`[office] internal error on ${req.method} ${url.pathname}: ${(e as Error)?.message ?? String(e)}`);
        if (!res.headersSent) sendJson(res, 500, { error: 'The office server hit an internal error; nothing from this request was saved. Try again.' });
        else res.destroy();
      }
    });
  });
  server.on('clientError', (_err, socket) => {
    if (socket.writable) socket.end('HTTP/1.1 400 Bad Request\r\nContent-Type: application/json\r\nConnection: close\r\n\r\n{"error":"The request could not be read."}');
  });
  await new Promise<void>((ok, fail) => {
    server.once('error', fail);
    server.listen(port, host, () => {
      server.off('error', fail);
      ok();
    });
  });
  const address = server.address();
  const actualPort = typeof address === 'object' && address ? address.port : port;
  const shownHost = host.includes(':') ? `[${host}]` : host;
  return {
    server,
    store,
    url: `http://${shownHost}:${actualPort}`,
    appBuilt: existsSync(join(resolve(distDir), 'index.html')),
    close: () =>
      new Promise<void>((ok) => {
        server.close(() => {
          store.close();
          ok();
        });
        server.closeAllConnections();
      }),
  };
}

const HELP = `Usage: npm run office -- [--port ${DEFAULT_PORT}] [--host ${DEFAULT_HOST}] [--data ${DEFAULT_DATA_DIR}] [--dist ${DEFAULT_DIST_DIR}]

Starts the Shearfield office server: the field app (from the build in --dist, so tablets can
install it from the office) and the sync API (${API_PREFIX}/status, /push, /pull).

Options:
  --port N     TCP port (0 = any free port). Default ${DEFAULT_PORT}.
  --host ADDR  Interface to listen on. Default ${DEFAULT_HOST} (this machine only); use 0.0.0.0 to
               let tablets on the office network connect.
  --data DIR   Folder of the SQLite store (created if missing). Default ${DEFAULT_DATA_DIR}.
  --dist DIR   The built app to serve. Default ${DEFAULT_DIST_DIR} (make it with npm run build).
  -h, --help   Show this help.

Devices need a token: shearfield device add NAME --data DIR.`;

async function main(argv: string[]): Promise<number> {
  let values: Record<string, string | boolean | undefined>;
  try {
    ({ values } = parseArgs({
      args: argv,
      options: {
        port: { type: 'string' },
        host: { type: 'string' },
        data: { type: 'string' },
        dist: { type: 'string' },
        help: { type: 'boolean', short: 'h' },
      },
    }));
  } catch (e) {
    process.stderr.write(`office: ${(e as Error).message.split('\n')[0]}\n\n${HELP}\n`);
    return 2;
  }
  if (values.help) {
    process.stdout.write(HELP + '\n');
    return 0;
  }
  const portText = (values.port as string | undefined) ?? String(DEFAULT_PORT);
  const port = Number(portText);
  if (!/^\d+$/.test(portText) || port > 65535) {
    process.stderr.write(`office: --port must be a whole number from 0 to 65535, but it is ${JSON.stringify(portText)}.\n`);
    return 2;
  }
  let running: RunningOffice;
  try {
    running = await startOfficeServer({
      port,
      host: values.host as string | undefined,
      dataDir: values.data as string | undefined,
      distDir: values.dist as string | undefined,
    });
  } catch (e) {
    const err = e as NodeJS.ErrnoException;
    if (err instanceof InputError) process.stderr.write(`office: ${err.message}\n`);
    else if (err.code === 'EADDRINUSE') process.stderr.write(`office: port ${port} is already in use; choose another with --port.\n`);
    else if (typeof err.path === 'string') {
      process.stderr.write(`office: could not start: "${err.path}" cannot be used (${err.code}); check --data and --dist.\n`);
    }
    else process.stderr.write(`office: could not start: ${err.message}\n`);
    return 1;
  }
  const data = resolve((values.data as string | undefined) ?? DEFAULT_DATA_DIR);
  process.stdout.write(`Shearfield office listening on ${running.url}\n`);
  process.stdout.write(`  store: ${running.store.file}\n`);
  process.stdout.write(
    running.appBuilt
      ? `  app: ${running.url}/ (from ${resolve((values.dist as string | undefined) ?? DEFAULT_DIST_DIR)})\n`
      : `  app: not built; run npm run build, then restart (the sync API works meanwhile)\n`,
  );
  if (running.store.listDevices().filter((d) => d.revokedAt === null).length === 0) {
    process.stdout.write(`  no devices yet: npx shearfield device add NAME --data ${data}\n`);
  }
  const stop = () => {
    void running.close().then(() => process.exit(0));
  };
  process.on('SIGINT', stop);
  process.on('SIGTERM', stop);
  return -1;
}

if (process.argv[1] && import.meta.url === pathToFileURL(resolve(process.argv[1])).href) {
  const code = await main(process.argv.slice(2));
  if (code >= 0) process.exit(code);
}
