/**
 * The office server on an office network (issue 11, items 13–18), with the
 * real server as its own process on a free port of 127.0.0.1 and a real
 * SQLite file. Requests that a browser or fetch would not send as they are
 * (another Host header, a body that drips or never ends) go through
 * node:http and node:net. Load stays bounded: a few requests, all local.
 */
import { request } from 'node:http';
import { connect } from 'node:net';
import { existsSync, mkdtempSync, readFileSync, statSync } from 'node:fs';
import { join } from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import type { PickRecord, SiteRecord } from '../../core/exchange/records';
import { MAX_PUSH_BYTES } from '../../core/exchange/sync-protocol';
import { DB_FILE_NAME } from '../../office/store';
import { addDevice, REPO_ROOT, removeTempDataDirs, startOffice, tempDataDir, type OfficeProcess } from './office-harness';

const T = '2026-05-10T08:00:00.000Z';
const DIST = join(REPO_ROOT, 'dist');
const offices: OfficeProcess[] = [];

afterAll(async () => {
  for (const o of offices) await o.kill();
  removeTempDataDirs();
});

async function office(extra: string[] = [], dist = DIST): Promise<{ srv: OfficeProcess; data: string; token: string; token2: string }> {
  const data = tempDataDir();
  const token = await addDevice(data, 'net-tablet');
  const token2 = await addDevice(data, 'net-tablet-2');
  const srv = await startOffice(data, 0, dist, extra);
  offices.push(srv);
  return { srv, data, token, token2 };
}

interface RawAnswer {
  status: number;
  headers: Record<string, string | string[] | undefined>;
  body: string;
}

/** One request through node:http with any headers (Host included). */
function raw(url: string, path: string, options: { method?: string; headers?: Record<string, string>; body?: string | Buffer } = {}): Promise<RawAnswer> {
  return new Promise((ok, fail) => {
    const u = new URL(url);
    const req = request({ host: u.hostname, port: u.port, path, method: options.method ?? 'GET', headers: options.headers, agent: false }, (res) => {
      let body = '';
      res.setEncoding('utf8');
      res.on('data', (d: string) => (body += d));
      res.on('end', () => ok({ status: res.statusCode ?? 0, headers: res.headers, body }));
    });
    req.on('error', fail);
    req.end(options.body);
  });
}

/**
 * Sends request headers and `sent` bytes of a body on a plain socket, then
 * waits for the server to answer and close. Resolves with what came back
 * and how many body bytes the client had managed to send.
 */
function partialRequest(url: string, head: string, sent: Buffer, more?: { every_ms: number; chunk: Buffer; max: number }): Promise<{ answer: string; closed: boolean }> {
  return new Promise((ok) => {
    const u = new URL(url);
    const socket = connect(Number(u.port), u.hostname);
    let answer = '';
    let timer: ReturnType<typeof setInterval> | undefined;
    let dripped = 0;
    socket.on('connect', () => {
      socket.write(head);
      socket.write(sent);
      if (more) {
        timer = setInterval(() => {
          if (dripped >= more.max || socket.destroyed) return;
          dripped++;
          socket.write(more.chunk);
        }, more.every_ms);
      }
    });
    socket.on('data', (d: Buffer) => (answer += d.toString('utf8')));
    const done = () => {
      if (timer) clearInterval(timer);
      ok({ answer, closed: true });
    };
    socket.on('close', done);
    socket.on('error', () => undefined);
  });
}

function site(id: string): SiteRecord {
  return { type: 'site', id, rev: 1, updatedAt: T, name: `Invented network site ${id}`, date: '2026-05-10', crew: '', notes: '', axisUnit: 'hz', settings: {} };
}

function picks(siteId: string, n: number): PickRecord[] {
  return Array.from({ length: n }, (_, k) => ({ type: 'pick', id: `${siteId}-p${k}`, rev: 1, updatedAt: T, siteId, order: k, frequency: 1 + (k % 500) * 0.05, velocity: 180 + (k % 97), sd: 6, kind: 'group', mode: 0, note: 'invented pick with a note to make the body larger' }) as PickRecord);
}

describe('13. CORS: only the office\'s own origin and the listed ones', () => {
  it('no wildcard; the own origin and an --allow-origin one are echoed, any other origin gets 403 and no CORS headers', async () => {
    const { srv, token } = await office(['--allow-origin', 'http://field-app.example:4173']);
    const auth = { Authorization: `Bearer ${token}` };
    const plain = await raw(srv.url, '/api/v1/status', { headers: auth });
    expect(plain.status).toBe(200);
    expect(plain.headers['access-control-allow-origin']).toBeUndefined();
    const own = await raw(srv.url, '/api/v1/status', { headers: { ...auth, Origin: srv.url } });
    expect(own.status).toBe(200);
    expect(own.headers['access-control-allow-origin']).toBe(srv.url);
    const listed = await raw(srv.url, '/api/v1/status', { headers: { ...auth, Origin: 'http://field-app.example:4173' } });
    expect(listed.headers['access-control-allow-origin']).toBe('http://field-app.example:4173');
    const other = await raw(srv.url, '/api/v1/status', { headers: { ...auth, Origin: 'http://evil.example' } });
    expect(other.status).toBe(403);
    expect(other.headers['access-control-allow-origin']).toBeUndefined();
    expect(JSON.parse(other.body).error).toBe(
      'Pages from "http://evil.example" may not use this office\'s sync API; the office allows its own address and those given with --allow-origin.',
    );
    const preflight = await raw(srv.url, '/api/v1/push', { method: 'OPTIONS', headers: { Origin: 'http://evil.example', 'Access-Control-Request-Method': 'POST' } });
    expect(preflight.status).toBe(403);
    expect(preflight.headers['access-control-allow-origin']).toBeUndefined();
    const okPreflight = await raw(srv.url, '/api/v1/push', { method: 'OPTIONS', headers: { Origin: 'http://field-app.example:4173', 'Access-Control-Request-Method': 'POST' } });
    expect(okPreflight.status).toBe(204);
    expect(okPreflight.headers['access-control-allow-origin']).toBe('http://field-app.example:4173');
  });
});

describe('14. Host check before authentication', () => {
  it('a Host that is not this server gets 421 whatever the path and token; localhost, the address and --allow-host names are answered', async () => {
    const { srv, token } = await office(['--allow-host', 'office.lan']);
    const auth = { Authorization: `Bearer ${token}` };
    for (const path of ['/', '/api/v1/status', '/api/v1/pull?since=0']) {
      const r = await raw(srv.url, path, { headers: { ...auth, Host: `rebound.example:${srv.port}` } });
      expect(r.status, path).toBe(421);
      expect(JSON.parse(r.body).error).toBe(
        'This office server does not answer to the host name "rebound.example:' + srv.port + '"; use its address, or start it with --allow-host NAME.',
      );
    }
    // Refused before authentication: the same answer with no token at all.
    expect((await raw(srv.url, '/api/v1/status', { headers: { Host: 'rebound.example' } })).status).toBe(421);
    for (const host of [`127.0.0.1:${srv.port}`, `localhost:${srv.port}`, `office.lan:${srv.port}`, 'OFFICE.LAN']) {
      expect((await raw(srv.url, '/api/v1/status', { headers: { ...auth, Host: host } })).status, host).toBe(200);
    }
  });
});

describe('15. security headers', () => {
  it('the app is served with a Content-Security-Policy allowing no inline script, frame-ancestors none and a referrer policy; the built page carries the policy too', async () => {
    const { srv, token } = await office();
    const page = await raw(srv.url, '/');
    expect(page.status).toBe(200);
    const csp = String(page.headers['content-security-policy']);
    const directives = new Map(csp.split(';').map((d) => d.trim().split(/\s+/)).map(([k, ...v]) => [k, v]));
    // Scripts from the app's own files only; ajv (the bundle schema check) compiles its validators, hence 'unsafe-eval'.
    expect(directives.get('script-src')).toEqual(["'self'", "'unsafe-eval'"]);
    expect(directives.get('frame-ancestors')).toEqual(["'none'"]);
    expect(directives.get('object-src')).toEqual(["'none'"]);
    expect(csp).not.toContain('unsafe-inline');
    expect(page.headers['referrer-policy']).toBe('no-referrer');
    expect(page.headers['x-content-type-options']).toBe('nosniff');
    const api = await raw(srv.url, '/api/v1/status', { headers: { Authorization: `Bearer ${token}` } });
    expect(api.headers['referrer-policy']).toBe('no-referrer');
    expect(String(api.headers['content-security-policy'])).toContain("frame-ancestors 'none'");
    // For a static host: the built page states the policy itself (frame-ancestors cannot be set by a meta tag).
    const html = readFileSync(join(DIST, 'index.html'), 'utf8').replace(/&#39;/g, "'");
    expect(html).toMatch(/<meta http-equiv="Content-Security-Policy" content="default-src 'self'; script-src 'self' 'unsafe-eval';[^"]*">/);
    expect(html).toContain('<meta name="referrer" content="no-referrer">');
    expect(html).not.toMatch(/<script(?![^>]*\ssrc=)[^>]*>/);
  });
});

describe('16. slow, large and unwanted requests', () => {
  it('a 70 MB body without a token gets 401 and the connection closes before the body is read', async () => {
    const { srv } = await office();
    const head = `POST /api/v1/push HTTP/1.1\r\nHost: 127.0.0.1:${srv.port}\r\nContent-Type: application/json\r\nContent-Length: ${70 * 1024 * 1024}\r\n\r\n`;
    const r = await partialRequest(srv.url, head, Buffer.alloc(256 * 1024, 32));
    expect(r.answer).toMatch(/^HTTP\/1\.1 401 /);
    expect(r.answer).toMatch(/\r\nConnection: close\r\n/i);
  });

  it('a body over the limit gets 413, by declared length (70 MB) or counted, and a push of more than 50,000 records gets 413', async () => {
    const { srv, token } = await office();
    const headers = { Authorization: `Bearer ${token}`, 'Content-Type': 'application/json' };
    const huge = await fetch(`${srv.url}/api/v1/push`, { method: 'POST', headers, body: Buffer.alloc(70 * 1024 * 1024, 32) });
    expect(huge.status).toBe(413);
    expect((await huge.json()).error).toBe('The request body is larger than the 16777216-byte limit (16 MiB); send the changes in smaller batches. Nothing was saved.');
    const many = await fetch(`${srv.url}/api/v1/push`, { method: 'POST', headers, body: JSON.stringify({ batchId: 'many', records: Array(50_001).fill({}) }) });
    expect(many.status).toBe(413);
    expect((await many.json()).error).toBe('A push may carry at most 50000 records, but this one has 50001; send the changes in smaller batches. Nothing was saved.');
  });

  it('a client still sending after the 413 is not reset: the rest of its body is drained and the connection serves its next request', async () => {
    const { srv, token } = await office();
    const u = new URL(srv.url);
    const size = MAX_PUSH_BYTES + 4 * 1024 * 1024;
    const outcome = await new Promise<{ answer: string; writeError?: string }>((ok) => {
      const socket = connect(Number(u.port), u.hostname);
      let answer = '';
      let writeError: string | undefined;
      socket.on('error', (e) => (writeError = (e as NodeJS.ErrnoException).code ?? e.message));
      socket.on('close', () => ok({ answer, writeError }));
      socket.on('data', (d: Buffer) => {
        answer += d.toString('utf8');
        // The second answer arrived: done.
        if ((answer.match(/HTTP\/1\.1 /g) ?? []).length === 2 && answer.endsWith('}')) socket.end();
      });
      socket.on('connect', async () => {
        socket.write(`POST /api/v1/push HTTP/1.1\r\nHost: 127.0.0.1:${u.port}\r\nAuthorization: Bearer ${token}\r\nContent-Type: application/json\r\nContent-Length: ${size}\r\n\r\n`);
        const chunk = Buffer.alloc(1024 * 1024, 32);
        // Keep sending well after the answer has come back (the server has read past its limit by then).
        for (let sent = 0; sent < size && !socket.destroyed; sent += chunk.length) {
          if (!socket.write(chunk.subarray(0, Math.min(chunk.length, size - sent)))) await new Promise((r) => socket.once('drain', r));
        }
        socket.write(`GET /api/v1/status HTTP/1.1\r\nHost: 127.0.0.1:${u.port}\r\nAuthorization: Bearer ${token}\r\n\r\n`);
      });
    });
    expect(outcome.writeError).toBeUndefined();
    expect(outcome.answer).toMatch(/^HTTP\/1\.1 413 /);
    expect(outcome.answer).toMatch(/HTTP\/1\.1 200 [^]*"server":"shearfield-office"/);
  });

  it('a body that drips slower than --body-timeout gets 408 and the connection is cut', async () => {
    const { srv, token } = await office(['--body-timeout', '1']);
    const head = `POST /api/v1/push HTTP/1.1\r\nHost: 127.0.0.1:${srv.port}\r\nAuthorization: Bearer ${token}\r\nContent-Type: application/json\r\nContent-Length: 100000\r\n\r\n`;
    const r = await partialRequest(srv.url, head, Buffer.from('{"batchId":"drip","records":['), { every_ms: 200, chunk: Buffer.from(' '), max: 100 });
    expect(r.answer).toMatch(/^HTTP\/1\.1 408 /);
    expect(r.answer).toContain('The request body did not arrive within 1 s; nothing was saved.');
  });

  it('one device may have --max-pushes pushes in progress; another gets 429 with Retry-After, other devices are not held up', async () => {
    const { srv, token, token2 } = await office(['--max-pushes', '1', '--body-timeout', '5']);
    const head = `POST /api/v1/push HTTP/1.1\r\nHost: 127.0.0.1:${srv.port}\r\nAuthorization: Bearer ${token}\r\nContent-Type: application/json\r\nContent-Length: 100000\r\n\r\n`;
    const slow = partialRequest(srv.url, head, Buffer.from('{"batchId":"slow","records":['), { every_ms: 100, chunk: Buffer.from(' '), max: 1000 });
    await new Promise((r) => setTimeout(r, 300));
    const second = await fetch(`${srv.url}/api/v1/push`, { method: 'POST', headers: { Authorization: `Bearer ${token}` }, body: JSON.stringify({ batchId: 'second', records: [site('busy-1')] }) });
    expect(second.status).toBe(429);
    expect(second.headers.get('retry-after')).toBe('2');
    const other = await fetch(`${srv.url}/api/v1/push`, { method: 'POST', headers: { Authorization: `Bearer ${token2}` }, body: JSON.stringify({ batchId: 'other', records: [site('busy-2')] }) });
    expect(other.status).toBe(200);
    expect((await slow).answer).toMatch(/^HTTP\/1\.1 408 /);
    // With the slow one gone, the first device may push again.
    const again = await fetch(`${srv.url}/api/v1/push`, { method: 'POST', headers: { Authorization: `Bearer ${token}` }, body: JSON.stringify({ batchId: 'again', records: [site('busy-3')] }) });
    expect(again.status).toBe(200);
  });

  it('405 answers carry Allow, on the API and on the app', async () => {
    const { srv, token } = await office();
    const api = await raw(srv.url, '/api/v1/push', { headers: { Authorization: `Bearer ${token}` } });
    expect(api.status).toBe(405);
    expect(api.headers.allow).toBe('POST');
    const pull = await raw(srv.url, '/api/v1/pull', { method: 'DELETE', headers: { Authorization: `Bearer ${token}` } });
    expect(pull.status).toBe(405);
    expect(pull.headers.allow).toBe('GET');
    const app = await raw(srv.url, '/', { method: 'POST', body: 'x' });
    expect(app.status).toBe(405);
    expect(app.headers.allow).toBe('GET, HEAD');
  });

  it('a big push (10,000 picks, 2.6 MB) is parsed and checked off the event loop: a status request sent while it is checked is answered first', async () => {
    const { srv, token } = await office();
    const body = JSON.stringify({ batchId: 'big', records: [site('big-site'), ...picks('big-site', 10_000)] });
    expect(body.length).toBeGreaterThan(2 * 1024 * 1024);
    const order: string[] = [];
    const push = fetch(`${srv.url}/api/v1/push`, { method: 'POST', headers: { Authorization: `Bearer ${token}`, 'Content-Type': 'application/json' }, body }).then(async (r) => {
      order.push(`push ${r.status}`);
      await r.arrayBuffer();
    });
    // Give the body time to arrive, then ask for the status while the push is still being checked and written (that takes seconds).
    await new Promise((r) => setTimeout(r, 400));
    const status = await fetch(`${srv.url}/api/v1/status`, { headers: { Authorization: `Bearer ${token}` } });
    order.push(`status ${status.status}`);
    await push;
    expect(order).toEqual(['status 200', 'push 200']);
  }, 120_000);
});

describe('17. file modes', () => {
  it('the store folder is created 0700 and the SQLite files 0600', async () => {
    const parent = tempDataDir();
    const data = join(parent, 'new-store');
    const token = await addDevice(data, 'mode-tablet');
    const srv = await startOffice(data, 0, DIST);
    offices.push(srv);
    const res = await fetch(`${srv.url}/api/v1/push`, { method: 'POST', headers: { Authorization: `Bearer ${token}` }, body: JSON.stringify({ batchId: 'm', records: [site('mode-site')] }) });
    expect(res.status).toBe(200);
    expect(statSync(data).mode & 0o777).toBe(0o700);
    for (const f of [DB_FILE_NAME, `${DB_FILE_NAME}-wal`, `${DB_FILE_NAME}-shm`]) {
      expect(existsSync(join(data, f)), f).toBe(true);
      expect(statSync(join(data, f)).mode & 0o777, f).toBe(0o600);
    }
  });
});

describe('18. the page shown when the app is not built', () => {
  it('names no file path of the server', async () => {
    const missing = mkdtempSync(join(tempDataDir(), 'no-app-'));
    const { srv, data } = await office([], join(missing, 'dist-not-here'));
    const page = await raw(srv.url, '/');
    expect(page.status).toBe(503);
    expect(page.body).toContain('npm run build');
    for (const path of [missing, data, REPO_ROOT, 'dist-not-here', '/tmp', '/home', '/work']) expect(page.body).not.toContain(path);
  });
});
