/**
 * Revision identity: which version of a record is this, exactly?
 *
 * A revision counter alone cannot tell two tablets apart: both can make
 * "rev 3" of the same site from the same rev 2. So every revision is named
 * by its **revision key** `"<rev>-<hash>"`, where `hash` is a content hash
 * of the whole record (every field except the bookkeeping fields `history`
 * and `conflicts`, which describe the lineage rather than the content).
 * Two different edits give two different keys; the same edit seen twice
 * gives the same key, so replays are recognised.
 *
 * The hash: FNV-1a, 64 bit, over the UTF-8 bytes of the record's canonical
 * JSON (object keys sorted, `undefined` left out, numbers as
 * `JSON.stringify` writes them), printed as 16 lower-case hex digits.
 * FNV-1a: G. Fowler, L. C. Noll, K.-P. Vo, D. Eastlake, "The FNV
 * Non-Cryptographic Hash Algorithm", IETF Internet-Draft
 * draft-eastlake-fnv (offset basis 0xcbf29ce484222325, prime 2^40 + 0x1b3).
 * It is not a cryptographic hash: it names versions, it does not
 * authenticate them (the office authenticates devices by token).
 *
 * Lineage: `history` lists the keys of the revisions this one was made
 * from, oldest first, at most HISTORY_LIMIT of them. `nextRevision`
 * (records.ts) appends the key of the revision it starts from, so the
 * merge rules (sync.ts) can tell "made from what you have" (accept) from
 * "made beside what you have" (conflict).
 */

/** Most ancestor keys a record carries. Longer offline edit chains fall back to a kept conflict, never a loss. */
export const HISTORY_LIMIT = 64;

/** Fields that describe lineage, not content; left out of the content hash. */
const BOOKKEEPING = new Set(['history', 'conflicts']);

/**
 * Canonical JSON: object keys sorted by UTF-16 code unit, `undefined`
 * members left out, arrays kept in order. Equal data gives equal text.
 * `skipTopLevel` leaves those members of the outermost object out.
 */
export function canonicalJson(value: unknown, skipTopLevel?: ReadonlySet<string>): string {
  if (value === null || typeof value !== 'object') {
    const text = JSON.stringify(value);
    return text === undefined ? 'null' : text;
  }
  if (Array.isArray(value)) {
    let out = '[';
    for (let i = 0; i < value.length; i++) out += (i > 0 ? ',' : '') + (value[i] === undefined ? 'null' : canonicalJson(value[i]));
    return out + ']';
  }
  const obj = value as Record<string, unknown>;
  const keys = Object.keys(obj).sort();
  let out = '{';
  let first = true;
  for (const k of keys) {
    const v = obj[k];
    if (v === undefined || skipTopLevel?.has(k)) continue;
    out += (first ? '' : ',') + JSON.stringify(k) + ':' + canonicalJson(v);
    first = false;
  }
  return out + '}';
}

/**
 * FNV-1a 64-bit hash of the UTF-8 encoding of `text`, as 16 hex digits.
 * Method: Fowler–Noll–Vo FNV-1a (draft-eastlake-fnv, §2), computed in two
 * 32-bit halves so that it runs without BigInt. Exact (integer arithmetic).
 */
export function fnv1a64(text: string): string {
  // h = hi·2^32 + lo; offset basis 0xcbf29ce484222325.
  let hi = 0xcbf29ce4;
  let lo = 0x84222325;
  const step = (byte: number): void => {
    lo ^= byte;
    // h · (2^40 + 0x1b3) mod 2^64.
    const loProduct = (lo >>> 0) * 0x1b3;
    const carry = Math.floor(loProduct / 0x100000000);
    const newLo = loProduct >>> 0;
    const newHi = (Math.imul(hi, 0x1b3) + carry + ((lo << 8) | 0)) >>> 0;
    hi = newHi;
    lo = newLo;
  };
  for (let i = 0; i < text.length; i++) {
    let cp = text.charCodeAt(i);
    if (cp >= 0xd800 && cp <= 0xdbff && i + 1 < text.length) {
      const next = text.charCodeAt(i + 1);
      if (next >= 0xdc00 && next <= 0xdfff) {
        cp = 0x10000 + ((cp - 0xd800) << 10) + (next - 0xdc00);
        i++;
      }
    }
    if (cp < 0x80) step(cp);
    else if (cp < 0x800) {
      step(0xc0 | (cp >> 6));
      step(0x80 | (cp & 0x3f));
    } else if (cp < 0x10000) {
      // Lone surrogates encode as U+FFFD, as TextEncoder does.
      if (cp >= 0xd800 && cp <= 0xdfff) cp = 0xfffd;
      step(0xe0 | (cp >> 12));
      step(0x80 | ((cp >> 6) & 0x3f));
      step(0x80 | (cp & 0x3f));
    } else {
      step(0xf0 | (cp >> 18));
      step(0x80 | ((cp >> 12) & 0x3f));
      step(0x80 | ((cp >> 6) & 0x3f));
      step(0x80 | (cp & 0x3f));
    }
  }
  return (hi >>> 0).toString(16).padStart(8, '0') + (lo >>> 0).toString(16).padStart(8, '0');
}

/** The minimum a record needs to have a revision key. */
export interface Revisioned {
  rev: number;
  history?: string[];
  conflicts?: unknown[];
}

/** Content hash of a record: FNV-1a 64 of its canonical JSON without `history` and `conflicts`. */
export function contentHash<T extends Revisioned>(record: T): string {
  return fnv1a64(canonicalJson(record, BOOKKEEPING));
}

/** The revision key `"<rev>-<hash>"` that names this exact version of a record. */
export function revisionKey<T extends Revisioned>(record: T): string {
  return `${record.rev}-${contentHash(record)}`;
}

/** The revision number inside a key (NaN when the key is not one). */
export function revOfKey(key: string): number {
  const dash = key.indexOf('-');
  return dash > 0 ? Number(key.slice(0, dash)) : NaN;
}

/**
 * The history a new revision made from `from` carries: `from`'s history,
 * then `from`'s own key, then any `extra` keys (versions it also
 * supersedes, e.g. the alternatives of a resolved conflict), without
 * repeats, the newest HISTORY_LIMIT kept.
 */
export function historyAfter(from: Revisioned, extra: readonly string[] = []): string[] {
  const out: string[] = [];
  const seen = new Set<string>();
  for (const k of [...(from.history ?? []), revisionKey(from), ...extra]) {
    if (seen.has(k)) continue;
    seen.add(k);
    out.push(k);
  }
  return out.length > HISTORY_LIMIT ? out.slice(out.length - HISTORY_LIMIT) : out;
}
