/**
 * Parsing and checking a push body without holding up the server: a body
 * of more than WORKER_THRESHOLD_BYTES is parsed and checked (JSON.parse and
 * core/exchange/sync-protocol-check.ts, which for 40,000 picks takes
 * seconds) in a worker thread, so static files, status and pull answers go
 * on meanwhile. Smaller bodies are checked in place. Either way the result
 * is the same: the checked push, or the same InputError / HttpError.
 */
import { existsSync, readFileSync } from 'node:fs';
import { dirname, extname, join } from 'node:path';
import { createRequire } from 'node:module';
import { fileURLToPath, pathToFileURL } from 'node:url';
import { Worker } from 'node:worker_threads';
import { MAX_PUSH_RECORDS, type PushRequest } from '../core/exchange/sync-protocol';
import { checkPushBody } from '../core/exchange/sync-protocol-check';
import { InputError } from '../core/shared/errors';

/** Bodies larger than this go to the worker thread, bytes. */
export const WORKER_THRESHOLD_BYTES = 256 * 1024;

/** A failure with an HTTP status of its own (413, 408 …) and extra response headers. */
export class HttpError extends Error {
  constructor(
    readonly status: number,
    message: string,
    readonly headers: Record<string, string> = {},
  ) {
    super(message);
    this.name = 'HttpError';
  }
}

export interface PushCheckRequest {
  id: number;
  body: Uint8Array;
}

export type PushCheckReply =
  | { id: number; ok: true; push: PushRequest }
  | { id: number; ok: false; error: { name: string; message: string; field?: string; status?: number } };

/** Parses and checks a push body in this thread; throws HttpError (400, 413) or InputError. */
export function parseAndCheckPush(raw: Buffer): PushRequest {
  let data: unknown;
  try {
    data = JSON.parse(raw.toString('utf8'));
  } catch {
    throw new HttpError(400, 'The request body is not valid JSON; nothing was saved.');
  }
  const records = (data as { records?: unknown } | null)?.records;
  if (Array.isArray(records) && records.length > MAX_PUSH_RECORDS) {
    throw new HttpError(413, `A push may carry at most ${MAX_PUSH_RECORDS} records, but this one has ${records.length}; send the changes in smaller batches. Nothing was saved.`);
  }
  return checkPushBody(data);
}

let worker: Worker | undefined;
let workerBroken = false;
let nextId = 1;
const waiting = new Map<number, { raw: Buffer; ok: (p: PushRequest) => void; fail: (e: unknown) => void }>();

/** Checks in this thread what the worker could not: the same answer, only without the worker's head start. */
function checkInPlace(w: { raw: Buffer; ok: (p: PushRequest) => void; fail: (e: unknown) => void }): void {
  try {
    w.ok(parseAndCheckPush(w.raw));
  } catch (e) {
    w.fail(e);
  }
}

/**
 * The worker's entry: the built server ships push-check-worker.js beside
 * itself; from the TypeScript sources (development, tests) a small script
 * first registers tsx (a runtime dependency) and then loads the .ts file.
 */
function spawnWorker(): Worker {
  const here = fileURLToPath(import.meta.url);
  const ext = extname(here);
  const file = new URL(`./push-check-worker${ext}`, import.meta.url);
  // In the build this code may sit in build/office/chunks/, one folder below the worker.
  if (ext !== '.ts') return new Worker(existsSync(file) ? file : new URL(`../push-check-worker${ext}`, import.meta.url));
  // The ES module entry of tsx/esm/api, found through tsx's own package.json exports.
  const pkgFile = createRequire(import.meta.url).resolve('tsx/package.json');
  const pkg = JSON.parse(readFileSync(pkgFile, 'utf8')) as { exports: Record<string, { import: { default: string } }> };
  const tsxApi = pathToFileURL(join(dirname(pkgFile), pkg.exports['./esm/api'].import.default)).href;
  const boot = `import(${JSON.stringify(tsxApi)}).then((m) => { m.register(); return import(${JSON.stringify(file.href)}); });`;
  return new Worker(boot, { eval: true });
}

function startWorker(): Worker | undefined {
  if (worker || workerBroken) return worker;
  try {
    worker = spawnWorker();
  } catch (e) {
    workerBroken = true;
    console.error(`[office] the push-check worker could not start (${(e as Error).message}); big pushes are checked in the main thread.`);
    return undefined;
  }
  worker.unref();
  worker.on('message', (reply: PushCheckReply) => {
    const w = waiting.get(reply.id);
    if (!w) return;
    waiting.delete(reply.id);
    if (reply.ok) w.ok(reply.push);
    else {
      const { name, message, field, status } = reply.error;
      w.fail(name === 'InputError' ? new InputError(field ?? 'body', message) : status !== undefined ? new HttpError(status, message) : new Error(message));
    }
  });
  // A worker that fails or stops hands its waiting bodies back to this thread; nothing is lost or answered twice.
  const giveBack = () => {
    worker = undefined;
    const left = [...waiting.values()];
    waiting.clear();
    for (const w of left) checkInPlace(w);
  };
  worker.on('error', (e) => {
    workerBroken = true;
    console.error(`[office] the push-check worker failed (${e.message}); big pushes are checked in the main thread.`);
    giveBack();
  });
  worker.on('exit', giveBack);
  return worker;
}

/** Parses and checks a push body: in a worker thread when it is big, else in place. */
export function checkPush(raw: Buffer): Promise<PushRequest> {
  if (raw.length <= WORKER_THRESHOLD_BYTES) return Promise.resolve().then(() => parseAndCheckPush(raw));
  const w = startWorker();
  if (!w) return Promise.resolve().then(() => parseAndCheckPush(raw));
  return new Promise<PushRequest>((ok, fail) => {
    const id = nextId++;
    waiting.set(id, { raw, ok, fail });
    // A copy goes to the worker (the body stays here in case the worker fails).
    w.postMessage({ id, body: new Uint8Array(raw.buffer, raw.byteOffset, raw.byteLength) } satisfies PushCheckRequest);
  });
}

/** Stops the worker (server shutdown). */
export async function stopPushChecks(): Promise<void> {
  const w = worker;
  worker = undefined;
  if (w) await w.terminate();
}
