/**
 * What the office server checks before it does any work, and the headers
 * it sends (office/server.ts):
 *
 * - Host: only the address it listens on, localhost names, this machine's
 *   interface addresses (when it listens on all of them) and names given
 *   with --allow-host; anything else is 421 before authentication, so a
 *   page on another site that renames itself to 127.0.0.1 (DNS rebinding)
 *   reaches nothing.
 * - CORS: browsers may call the API only from the office's own origin and
 *   the origins given with --allow-origin; no wildcard.
 * - Security headers on every answer; the app gets a Content-Security-Policy
 *   with no inline script and `frame-ancestors 'none'`.
 * - Request bodies: a size limit (413, the rest of the body drained and the
 *   connection closed), a time limit (408, connection cut), and answers that
 *   read no body (401, 405, 421, 429) close the connection after reading at
 *   most DISCARD_LIMIT_BYTES of it.
 */
import type { IncomingMessage, ServerResponse } from 'node:http';
import { networkInterfaces } from 'node:os';
import { HttpError } from './push-check';

export { APP_CSP } from './app-csp';

/** At most this much of a body the server does not want is read (so the client can read the answer) before the connection closes, bytes. */
export const DISCARD_LIMIT_BYTES = 64 * 1024;

/** Headers on every answer, app and API. */
export const COMMON_HEADERS: Readonly<Record<string, string>> = {
  'X-Content-Type-Options': 'nosniff',
  'Referrer-Policy': 'no-referrer',
  'X-Frame-Options': 'DENY',
  'Cross-Origin-Opener-Policy': 'same-origin',
  'Cross-Origin-Resource-Policy': 'same-origin',
};

/** The API's own policy: it serves data, never a page. */
export const API_CSP = "default-src 'none'; frame-ancestors 'none'";

/** The host part of a Host header or origin host: lower case, IPv6 without brackets, no port. */
function hostName(host: string): string {
  const h = host.trim().toLowerCase();
  if (h.startsWith('[')) return h.slice(1, h.indexOf(']') > 0 ? h.indexOf(']') : undefined);
  const colon = h.lastIndexOf(':');
  return colon >= 0 && h.indexOf(':') === colon ? h.slice(0, colon) : h;
}

/** The host names a request may address: the bound host, localhost names, interface addresses when bound to all, and extra names. */
export function allowedHostNames(boundHost: string, extra: readonly string[] = []): Set<string> {
  const names = new Set<string>(['localhost', '127.0.0.1', '::1', hostName(boundHost)]);
  if (boundHost === '0.0.0.0' || boundHost === '::' || boundHost === '') {
    for (const list of Object.values(networkInterfaces())) for (const i of list ?? []) names.add(i.address.toLowerCase());
  }
  for (const e of extra) names.add(hostName(e));
  return names;
}

/** True when the request's Host header names this server. */
export function hostAllowed(req: IncomingMessage, names: ReadonlySet<string>): boolean {
  const host = req.headers.host;
  return typeof host === 'string' && host !== '' && names.has(hostName(host));
}

/** Normalises an origin given with --allow-origin (scheme://host[:port]); throws a sentence when it is not one. */
export function normaliseOrigin(text: string): string {
  let url: URL;
  try {
    url = new URL(text);
  } catch {
    throw new Error(`--allow-origin ${JSON.stringify(text)} is not an origin; write it like http://192.168.1.20:4173.`);
  }
  if ((url.protocol !== 'http:' && url.protocol !== 'https:') || url.origin === 'null') {
    throw new Error(`--allow-origin ${JSON.stringify(text)} must start with http:// or https://.`);
  }
  return url.origin;
}

/**
 * The CORS headers for a request: the origin echoed when it is the office's
 * own (scheme + Host of this request) or an allowed one; none otherwise.
 */
export function corsHeaders(req: IncomingMessage, allowed: ReadonlySet<string>): { allowed: boolean; headers: Record<string, string> } {
  const origin = req.headers.origin;
  if (typeof origin !== 'string') return { allowed: true, headers: { Vary: 'Origin' } };
  const own = typeof req.headers.host === 'string' ? `http://${req.headers.host.toLowerCase()}` : '';
  if (origin.toLowerCase() === own || allowed.has(origin.toLowerCase())) {
    return {
      allowed: true,
      headers: {
        'Access-Control-Allow-Origin': origin,
        'Access-Control-Allow-Headers': 'Authorization, Content-Type',
        'Access-Control-Allow-Methods': 'GET, POST, OPTIONS',
        'Access-Control-Max-Age': '600',
        Vary: 'Origin',
      },
    };
  }
  return { allowed: false, headers: { Vary: 'Origin' } };
}

/**
 * Sends an answer that needs no body from the request and closes the
 * connection: reads at most DISCARD_LIMIT_BYTES of what the client sends
 * (so a small request still gets to read the answer), never more.
 */
export function answerAndClose(req: IncomingMessage, res: ServerResponse, status: number, body: string, headers: Record<string, string>): void {
  const declared = Number(req.headers['content-length'] ?? 0);
  let seen = 0;
  const cut = () => req.socket.destroy();
  if (declared > DISCARD_LIMIT_BYTES) res.once('finish', cut);
  else {
    req.on('data', (chunk: Buffer) => {
      seen += chunk.length;
      if (seen > DISCARD_LIMIT_BYTES) cut();
    });
  }
  res.writeHead(status, { ...headers, Connection: 'close', 'Content-Length': Buffer.byteLength(body) });
  res.end(body);
}

/**
 * Reads a request body of at most `limit` bytes within `timeoutMs`.
 * Over the limit (declared or counted): a 413 at once; the rest of the body
 * is drained (not kept) so the client can read the answer, and the
 * connection is cut if the body has not ended `timeoutMs` later. Too slow:
 * a 408 and the connection is cut.
 */
export function readBody(req: IncomingMessage, limit: number, timeoutMs: number): Promise<Buffer> {
  return new Promise((resolveBody, reject) => {
    const tooBig = () =>
      // No "Connection: close": with it Node destroys the socket as soon as
      // the answer is written, and a client still sending its body can see
      // that reset (write EPIPE) before it reads the 413. The rest of the
      // body is drained instead, and the socket cut if it does not end in time.
      new HttpError(413, `The request body is larger than the ${limit}-byte limit (${Math.round(limit / 1048576)} MiB); send the changes in smaller batches. Nothing was saved.`);
    const chunks: Buffer[] = [];
    let size = 0;
    let settled = false;
    const settle = (fn: () => void) => {
      if (settled) return;
      settled = true;
      clearTimeout(timer);
      fn();
    };
    const timer = setTimeout(() => {
      settle(() => reject(new HttpError(408, `The request body did not arrive within ${Math.round(timeoutMs / 1000)} s; nothing was saved.`, { Connection: 'close' })));
      // Nothing more is read from this client.
      setImmediate(() => req.socket.destroy());
    }, timeoutMs);
    // Past the limit the rest is drained, not kept, for at most `timeoutMs` more.
    // A body that ends in time leaves the connection for the client's next request.
    const drain = () => {
      const cut = setTimeout(() => req.socket.destroy(), timeoutMs);
      cut.unref();
      req.once('end', () => clearTimeout(cut));
      req.resume();
    };
    if (Number(req.headers['content-length']) > limit) {
      settle(() => reject(tooBig()));
      drain();
      return;
    }
    req.on('data', (chunk: Buffer) => {
      if (settled) return;
      size += chunk.length;
      if (size > limit) {
        chunks.length = 0;
        settle(() => reject(tooBig()));
        drain();
        return;
      }
      chunks.push(chunk);
    });
    req.on('end', () => settle(() => resolveBody(Buffer.concat(chunks))));
    req.on('error', (e) => settle(() => reject(e)));
    req.on('close', () => {
      if (!req.complete) settle(() => reject(new HttpError(400, 'The request body was cut off; nothing was saved.')));
    });
  });
}
