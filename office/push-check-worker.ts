/**
 * The worker thread behind office/push-check.ts: parses and checks one push
 * body (JSON.parse, then core/exchange/sync-protocol-check.ts) away from the
 * server's event loop, and posts back the checked records or the error.
 */
import { parentPort } from 'node:worker_threads';
import { parseAndCheckPush, type PushCheckReply, type PushCheckRequest } from './push-check';

parentPort!.on('message', (msg: PushCheckRequest) => {
  let reply: PushCheckReply;
  try {
    reply = { id: msg.id, ok: true, push: parseAndCheckPush(Buffer.from(msg.body)) };
  } catch (e) {
    reply = { id: msg.id, ok: false, error: serialise(e) };
  }
  parentPort!.postMessage(reply);
});

function serialise(e: unknown): { name: string; message: string; field?: string; status?: number } {
  const err = e as { name?: string; message?: string; field?: string; status?: number };
  return { name: err?.name ?? 'Error', message: err?.message ?? String(e), field: err?.field, status: err?.status };
}
