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
 *
 * Before any of that (office/server-guards.ts): a Host that is not this
 * server is 421; the API answers CORS only to the office's own origin and
 * --allow-origin ones; bodies have a size limit (413), a time limit (408)
 * and a per-device limit of pushes at once (429); big push bodies are
 * parsed and checked in a worker thread (office/push-check.ts) so other
 * requests go on.
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
import { checkPullQuery } from '../core/exchange/sync-protocol-check';
import { checkPush, HttpError, stopPushChecks } from './push-check';
import { allowedHostNames, answerAndClose, API_CSP, APP_CSP, COMMON_HEADERS, corsHeaders, hostAllowed, normaliseOrigin, readBody } from './server-guards';
import {
  checkRecordingsPullQuery,
  checkRecordingsPushBody,
  type RecordingsPullResponse,
  type RecordingsPushResponse,
} from '../core/exchange/recording-sync';
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
  /** Browser origins besides the office's own that may call the API (CORS). @default none */
  allowOrigins?: string[];
  /** Host names the server answers to besides its address, localhost and (bound to all) the machine's addresses. @default none */
  allowHosts?: string[];
  /** How long a request body may take to arrive, ms. @default DEFAULT_BODY_TIMEOUT_MS */
  bodyTimeoutMs?: number;
  /** Pushes one device may have in progress at once. @default DEFAULT_MAX_PUSHES_PER_DEVICE */
  maxPushesPerDevice?: number;
}

/** Default time limit of a request body, ms. */
export const DEFAULT_BODY_TIMEOUT_MS = 30_000;
/** Default number of pushes one device may have in progress at once. */
export const DEFAULT_MAX_PUSHES_PER_DEVICE = 2;

export interface RunningOffice {
  server: Server;
  store: OfficeStore;
  url: string;
  /** True when dist/ holds a built app. */
  appBuilt: boolean;
  close(): Promise<void>;
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

function sendJson(res: ServerResponse, status: number, body: unknown, extra: Record<string, string> = {}): void {
  const text = JSON.stringify(body);
  res.writeHead(status, {
    'Content-Type': 'application/json; charset=utf-8',
    'Content-Length': Buffer.byteLength(text),
    'Cache-Control': 'no-store',
    'Content-Security-Policy': API_CSP,
    ...COMMON_HEADERS,
    ...extra,
  });
  res.end(text);
}

/** A JSON error answer that reads no more of the request and closes the connection (401, 404, 405, 421, 429). */
function refuse(req: IncomingMessage, res: ServerResponse, status: number, error: string, extra: Record<string, string> = {}): void {
  answerAndClose(req, res, status, JSON.stringify({ error }), {
    'Content-Type': 'application/json; charset=utf-8',
    'Cache-Control': 'no-store',
    'Content-Security-Policy': API_CSP,
    ...COMMON_HEADERS,
    ...extra,
  });
}

function bearer(req: IncomingMessage): string | undefined {
  const h = req.headers.authorization;
  if (typeof h !== 'string') return undefined;
  const m = /^Bearer\s+(\S+)\s*$/i.exec(h);
  return m ? m[1] : undefined;
}

/** The page shown while there is no built app: no file paths (they are in the server's own output). */
function notBuiltPage(): string {
  return `<!doctype html><meta charset="utf-8"><title>Shearfield office</title>
<p>The field app is not built on this office computer yet. Whoever runs the office server: run <code>npm run build</code> in the Shearfield folder, then restart the server. The sync API works meanwhile.</p>`;
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

/** The server's running state that the API handler needs. */
interface ApiContext {
  store: OfficeStore;
  writeWaitMs: number;
  bodyTimeoutMs: number;
  maxPushesPerDevice: number;
  /** Pushes being received or written now, per device id. */
  activePushes: Map<number, number>;
}

const API_METHODS: Readonly<Record<string, string>> = { '/status': 'GET', '/push': 'POST', '/pull': 'GET' };

async function handleApi(req: IncomingMessage, res: ServerResponse, url: URL, ctx: ApiContext, cors: Record<string, string>): Promise<void> {
  const { store } = ctx;
  // Authentication comes first: without a valid token nothing is read or written, the body included.
  const token = bearer(req);
  const device = token === undefined ? undefined : store.authenticate(token);
  if (!device) {
    refuse(
      req,
      res,
      401,
      token === undefined ? 'This request needs a device token: send the header "Authorization: Bearer TOKEN".' : 'The device token is not valid or has been revoked; ask the office for a new one.',
      { 'WWW-Authenticate': 'Bearer realm="shearfield-office"', ...cors },
    );
    return;
  }
  const path = url.pathname.slice(API_PREFIX.length);
  if (path === '/recordings') {
    await handleRecordings(req, res, url, ctx, device.name, cors);
    return;
  }
  const method = API_METHODS[path];
  if (method === undefined) {
    refuse(req, res, 404, `There is no API at ${url.pathname}; the sync API has ${API_PREFIX}/status, ${API_PREFIX}/push and ${API_PREFIX}/pull.`, cors);
    return;
  }
  if (req.method !== method) {
    refuse(req, res, 405, `${req.method} is not allowed on ${url.pathname}; use ${method}.`, { Allow: method, ...cors });
    return;
  }
  if (path === '/status') {
    const counts = store.counts();
    const body: StatusResponse = {
      server: 'shearfield-office',
      protocol: PROTOCOL_VERSION,
      device: device.name,
      records: counts.records,
      conflicts: counts.conflicts,
      cursor: String(store.cursor()),
    };
    sendJson(res, 200, body, cors);
    return;
  }
  if (path === '/pull') {
    const q = checkPullQuery(url.searchParams);
    const page = store.pull(q.since, q.limit);
    const body: PullResponse = { records: page.records, cursor: String(page.cursor), more: page.more, seqs: page.seqs.map(String) };
    sendJson(res, 200, body, cors);
    return;
  }
  // POST /push: at most maxPushesPerDevice at once from one device.
  const active = ctx.activePushes.get(device.id) ?? 0;
  if (active >= ctx.maxPushesPerDevice) {
    refuse(req, res, 429, `This device already has ${active} pushes in progress; wait for them to finish. Nothing was saved.`, { 'Retry-After': '2', ...cors });
    return;
  }
  ctx.activePushes.set(device.id, active + 1);
  try {
    const raw = await readBody(req, MAX_PUSH_BYTES, ctx.bodyTimeoutMs);
    const push = await checkPush(raw);
    const result = await whenStoreFree(() => store.applyBatch(push.records, { batchId: push.batchId, source: device.name, deviceId: device.id }), ctx.writeWaitMs);
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
    sendJson(res, 200, body, cors);
  } finally {
    const left = (ctx.activePushes.get(device.id) ?? 1) - 1;
    if (left > 0) ctx.activePushes.set(device.id, left);
    else ctx.activePushes.delete(device.id);
  }
}

/** GET and POST /recordings (core/exchange/recording-sync.ts): seismograph recordings and their raw files. */
async function handleRecordings(req: IncomingMessage, res: ServerResponse, url: URL, ctx: ApiContext, source: string, cors: Record<string, string>): Promise<void> {
  const { store } = ctx;
  if (req.method === 'GET') {
    const page = store.pullRecordings(checkRecordingsPullQuery(url.searchParams).since);
    const body: RecordingsPullResponse = { recordings: page.recordings, files: page.files, cursor: String(page.cursor), more: page.more };
    sendJson(res, 200, body, cors);
    return;
  }
  if (req.method !== 'POST') {
    refuse(req, res, 405, `${req.method} is not allowed on ${url.pathname}; use GET or POST.`, { Allow: 'GET, POST', ...cors });
    return;
  }
  const raw = await readBody(req, MAX_PUSH_BYTES, ctx.bodyTimeoutMs);
  let data: unknown;
  try {
    data = JSON.parse(raw.toString('utf8'));
  } catch {
    throw new HttpError(400, 'The request body is not valid JSON; nothing was saved.');
  }
  const push = checkRecordingsPushBody(data);
  const result = await whenStoreFree(() => store.applyRecordings(push.recordings, push.files, source), ctx.writeWaitMs);
  const body: RecordingsPushResponse = { accepted: result.accepted, ignored: result.ignored, conflicts: result.conflicts, cursor: String(result.cursor) };
  sendJson(res, 200, body, cors);
}

function serveApp(req: IncomingMessage, res: ServerResponse, url: URL, distDir: string): void {
  if (req.method !== 'GET' && req.method !== 'HEAD') {
    answerAndClose(req, res, 405, 'Only GET and HEAD are served here.\n', { 'Content-Type': 'text/plain; charset=utf-8', Allow: 'GET, HEAD', ...COMMON_HEADERS });
    return;
  }
  const root = resolve(distDir);
  if (!existsSync(join(root, 'index.html'))) {
    res.writeHead(503, { 'Content-Type': 'text/html; charset=utf-8', 'Cache-Control': 'no-store', 'Content-Security-Policy': APP_CSP, ...COMMON_HEADERS }).end(notBuiltPage());
    return;
  }
  let rel: string;
  try {
    rel = decodeURIComponent(url.pathname);
  } catch {
    res.writeHead(400, { 'Content-Type': 'text/plain; charset=utf-8', ...COMMON_HEADERS }).end('The address is not valid.\n');
    return;
  }
  let file = normalize(join(root, rel));
  if (file !== root && !file.startsWith(root + sep)) {
    res.writeHead(404, { 'Content-Type': 'text/plain; charset=utf-8', ...COMMON_HEADERS }).end('Not found.\n');
    return;
  }
  let exists = existsSync(file) && statSync(file).isFile();
  if (!exists && extname(rel) === '') {
    // An app route: the app's page handles it.
    file = join(root, 'index.html');
    exists = true;
  }
  if (!exists) {
    res.writeHead(404, { 'Content-Type': 'text/plain; charset=utf-8', ...COMMON_HEADERS }).end('Not found.\n');
    return;
  }
  const name = file.slice(root.length + 1);
  const fresh = name === 'index.html' || name === 'sw.js' || name.endsWith('.webmanifest') || name.startsWith('workbox-') || name === 'registerSW.js';
  res.writeHead(200, {
    'Content-Type': MIME[extname(file).toLowerCase()] ?? 'application/octet-stream',
    'Content-Length': statSync(file).size,
    'Cache-Control': fresh ? 'no-cache' : name.startsWith('assets/') ? 'public, max-age=31536000, immutable' : 'public, max-age=3600',
    'Content-Security-Policy': APP_CSP,
    ...COMMON_HEADERS,
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
  const allowOrigins = new Set((options.allowOrigins ?? []).map((o) => normaliseOrigin(o).toLowerCase()));
  const hostNames = allowedHostNames(host, options.allowHosts);
  const store = OfficeStore.open(options.dataDir ?? DEFAULT_DATA_DIR, { create: true, busyTimeoutMs: SERVER_BUSY_TIMEOUT_MS });
  const ctx: ApiContext = {
    store,
    writeWaitMs: options.writeWaitMs ?? DEFAULT_WRITE_WAIT_MS,
    bodyTimeoutMs: options.bodyTimeoutMs ?? DEFAULT_BODY_TIMEOUT_MS,
    maxPushesPerDevice: options.maxPushesPerDevice ?? DEFAULT_MAX_PUSHES_PER_DEVICE,
    activePushes: new Map(),
  };
  const server = createServer((req, res) => {
    // The Host check comes before everything else, authentication included (DNS rebinding).
    if (!hostAllowed(req, hostNames)) {
      refuse(req, res, 421, `This office server does not answer to the host name ${JSON.stringify(String(req.headers.host ?? '').slice(0, 100))}; use its address, or start it with --allow-host NAME.`);
      return;
    }
    let url: URL;
    try {
      url = new URL(req.url ?? '/', 'http://office.invalid');
    } catch {
      refuse(req, res, 400, 'The request address is not valid.');
      return;
    }
    if (!url.pathname.startsWith(API_PREFIX + '/') && url.pathname !== API_PREFIX) {
      serveApp(req, res, url, distDir);
      return;
    }
    const cors = corsHeaders(req, allowOrigins);
    if (!cors.allowed) {
      refuse(req, res, 403, `Pages from ${JSON.stringify(String(req.headers.origin).slice(0, 100))} may not use this office's sync API; the office allows its own address and those given with --allow-origin.`, cors.headers);
      return;
    }
    if (req.method === 'OPTIONS') {
      answerAndClose(req, res, 204, '', { ...COMMON_HEADERS, ...cors.headers });
      return;
    }
    handleApi(req, res, url, ctx, cors.headers).catch((e: unknown) => {
      if (e instanceof HttpError) {
        if (!res.headersSent && !res.destroyed) sendJson(res, e.status, { error: e.message }, { ...cors.headers, ...e.headers });
      } else if (e instanceof InputError) {
        if (!res.headersSent && !res.destroyed) sendJson(res, 400, { error: `${e.message} Nothing was saved.`, field: e.field }, cors.headers);
      } else {
        // The details go to the office log only, never to the client.
        console.error(`[office] internal error on ${req.method} ${url.pathname}: ${(e as Error)?.message ?? String(e)}`);
        if (!res.headersSent && !res.destroyed) sendJson(res, 500, { error: 'The office server hit an internal error; nothing from this request was saved. Try again.' }, cors.headers);
        else res.destroy();
      }
    });
  });
  // Backstops behind readBody's own timer: Node cuts a request whose headers or whole body take too long.
  server.headersTimeout = Math.min(20_000, ctx.bodyTimeoutMs + 5_000);
  server.requestTimeout = ctx.bodyTimeoutMs + 5_000;
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
          void stopPushChecks().then(ok, ok);
        });
        server.closeAllConnections();
      }),
  };
}

const HELP = `Usage: npm run office -- [--port ${DEFAULT_PORT}] [--host ${DEFAULT_HOST}] [--data ${DEFAULT_DATA_DIR}] [--dist ${DEFAULT_DIST_DIR}] [options]

Starts the Shearfield office server: the field app (from the build in --dist, so tablets can
install it from the office) and the sync API (${API_PREFIX}/status, /push, /pull).

Options:
  --port N             TCP port (0 = any free port). Default ${DEFAULT_PORT}.
  --host ADDR          Interface to listen on. Default ${DEFAULT_HOST} (this machine only); use 0.0.0.0 to
                       let tablets on the office network connect.
  --data DIR           Folder of the SQLite store (created 0700 if missing). Default ${DEFAULT_DATA_DIR}.
  --dist DIR           The built app to serve. Default ${DEFAULT_DIST_DIR} (make it with npm run build).
  --allow-host NAME    Also answer requests addressed to this host name (repeatable), e.g. a DNS name
                       of the office computer. Always answered: the --host address, localhost, and
                       with 0.0.0.0 this computer's own addresses; any other Host gets 421.
  --allow-origin URL   Let pages from this origin call the sync API (repeatable), e.g. the app served
                       by npm start at http://OFFICE:4173. The office's own address is always allowed.
  --body-timeout S     Seconds a request body may take to arrive (408 after). Default ${DEFAULT_BODY_TIMEOUT_MS / 1000}.
  --max-pushes N       Pushes one device may have in progress at once (429 beyond). Default ${DEFAULT_MAX_PUSHES_PER_DEVICE}.
  --write-wait S       Seconds a push waits while another writer (a bundle import) holds the store
                       (503 with Retry-After after). Default ${DEFAULT_WRITE_WAIT_MS / 1000}.
  -h, --help           Show this help.

Devices need a token: shearfield device add NAME --data DIR.`;

/** A whole number of seconds (or a decimal) from `min` to `max`, from option `name`; a sentence otherwise. */
function seconds(text: string | undefined, name: string, fallbackMs: number, min: number, max: number): number {
  if (text === undefined) return fallbackMs;
  const v = Number(text);
  if (!/^\d+(\.\d+)?$/.test(text) || v < min || v > max) throw new InputError(name, `${name} must be a number of seconds from ${min} to ${max}, but it is ${JSON.stringify(text)}.`);
  return Math.round(v * 1000);
}

/**
 * `npm run office -- …`: parses the options, starts the server and prints
 * where it listens. Resolves to an exit code, or -1 while the server runs.
 */
export async function runServerCommand(argv: string[]): Promise<number> {
  let values: ReturnType<typeof parseOptions>['values'];
  try {
    ({ values } = parseOptions(argv));
  } catch (e) {
    process.stderr.write(`office: ${(e as Error).message.split('\n')[0]}\n\n${HELP}\n`);
    return 2;
  }
  if (values.help) {
    process.stdout.write(HELP + '\n');
    return 0;
  }
  const portText = values.port ?? String(DEFAULT_PORT);
  const port = Number(portText);
  if (!/^\d+$/.test(portText) || port > 65535) {
    process.stderr.write(`office: --port must be a whole number from 0 to 65535, but it is ${JSON.stringify(portText)}.\n`);
    return 2;
  }
  let settings: Pick<OfficeServerOptions, 'bodyTimeoutMs' | 'writeWaitMs' | 'maxPushesPerDevice' | 'allowOrigins'>;
  try {
    const maxText = values['max-pushes'];
    if (maxText !== undefined && (!/^\d{1,3}$/.test(maxText) || Number(maxText) < 1)) {
      throw new InputError('--max-pushes', `--max-pushes must be a whole number from 1 to 999, but it is ${JSON.stringify(maxText)}.`);
    }
    settings = {
      bodyTimeoutMs: seconds(values['body-timeout'], '--body-timeout', DEFAULT_BODY_TIMEOUT_MS, 1, 3600),
      writeWaitMs: seconds(values['write-wait'], '--write-wait', DEFAULT_WRITE_WAIT_MS, 0, 3600),
      maxPushesPerDevice: maxText === undefined ? DEFAULT_MAX_PUSHES_PER_DEVICE : Number(maxText),
      allowOrigins: (values['allow-origin'] ?? []).map((o) => {
        try {
          return normaliseOrigin(o);
        } catch (e) {
          throw new InputError('--allow-origin', (e as Error).message);
        }
      }),
    };
  } catch (e) {
    process.stderr.write(`office: ${(e as Error).message}\n`);
    return 2;
  }
  let running: RunningOffice;
  try {
    running = await startOfficeServer({
      port,
      host: values.host,
      dataDir: values.data,
      distDir: values.dist,
      allowHosts: values['allow-host'],
      ...settings,
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
  const data = resolve(values.data ?? DEFAULT_DATA_DIR);
  process.stdout.write(`Shearfield office listening on ${running.url}\n`);
  process.stdout.write(`  store: ${running.store.file}\n`);
  process.stdout.write(
    running.appBuilt
      ? `  app: ${running.url}/ (from ${resolve(values.dist ?? DEFAULT_DIST_DIR)})\n`
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

function parseOptions(argv: string[]) {
  return parseArgs({
    args: argv,
    options: {
      port: { type: 'string' },
      host: { type: 'string' },
      data: { type: 'string' },
      dist: { type: 'string' },
      'allow-host': { type: 'string', multiple: true },
      'allow-origin': { type: 'string', multiple: true },
      'body-timeout': { type: 'string' },
      'max-pushes': { type: 'string' },
      'write-wait': { type: 'string' },
      help: { type: 'boolean', short: 'h' },
    },
  });
}

if (process.argv[1] && import.meta.url === pathToFileURL(resolve(process.argv[1])).href) {
  const code = await runServerCommand(process.argv.slice(2));
  if (code >= 0) process.exit(code);
}
