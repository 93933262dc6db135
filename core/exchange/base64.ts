/**
 * Base64 (RFC 4648 §4, the standard alphabet with `=` padding) for the raw
 * files that travel inside bundles and sync bodies. Pure TypeScript: core
 * has neither Buffer nor atob. Decoding is strict: a character outside the
 * alphabet, a wrong length or stray padding throws one InputError.
 */
import { InputError } from '../shared/errors';

const ALPHABET = 'ABCDEFGHIJKLMNOPQRSTUVWXYZabcdefghijklmnopqrstuvwxyz0123456789+/';
const VALUE = new Int16Array(128).fill(-1);
for (let i = 0; i < ALPHABET.length; i++) VALUE[ALPHABET.charCodeAt(i)] = i;

/** The base64 text of some bytes. */
export function toBase64(bytes: Uint8Array): string {
  const parts: string[] = [];
  let chunk = '';
  for (let i = 0; i < bytes.length; i += 3) {
    const a = bytes[i];
    const b = i + 1 < bytes.length ? bytes[i + 1] : 0;
    const c = i + 2 < bytes.length ? bytes[i + 2] : 0;
    const n = (a << 16) | (b << 8) | c;
    chunk +=
      ALPHABET[(n >> 18) & 63] +
      ALPHABET[(n >> 12) & 63] +
      (i + 1 < bytes.length ? ALPHABET[(n >> 6) & 63] : '=') +
      (i + 2 < bytes.length ? ALPHABET[n & 63] : '=');
    if (chunk.length >= 8192) {
      parts.push(chunk);
      chunk = '';
    }
  }
  parts.push(chunk);
  return parts.join('');
}

/** The bytes of base64 text; `field` names it in the message of a refusal. */
export function fromBase64(text: string, field: string): Uint8Array {
  if (typeof text !== 'string' || text.length % 4 !== 0) {
    throw new InputError(field, `${field} is not base64: its length must be a multiple of 4.`);
  }
  const pad = text.endsWith('==') ? 2 : text.endsWith('=') ? 1 : 0;
  const out = new Uint8Array((text.length / 4) * 3 - pad);
  let o = 0;
  for (let i = 0; i < text.length; i += 4) {
    let n = 0;
    for (let k = 0; k < 4; k++) {
      const ch = text.charCodeAt(i + k);
      const last = i + 4 === text.length;
      if (ch === 61 /* = */ && last && k >= 4 - pad) {
        n <<= 6;
        continue;
      }
      const v = ch < 128 ? VALUE[ch] : -1;
      if (v < 0) throw new InputError(field, `${field} is not base64: character ${i + k + 1} is not in the base64 alphabet.`);
      n = (n << 6) | v;
    }
    out[o++] = (n >> 16) & 255;
    if (o < out.length) out[o++] = (n >> 8) & 255;
    if (o < out.length) out[o++] = n & 255;
  }
  return out;
}
