/**
 * Our 256-entry EBCDIC table (core/recordings/ebcdic.ts) against an
 * independent implementation of IBM code page 037: Python's standard
 * `cp037` codec, run by /usr/bin/python3. Skipped, with the reason, where
 * no python3 is installed (scripts/ensure-env.sh brings it with
 * python3-segyio). The table in ebcdic.ts was generated from this same codec,
 * so this check guards against copying mistakes and any later edit; it is not an
 * independent derivation of the code page.
 */
import { spawnSync } from 'node:child_process';
import { describe, expect, it } from 'vitest';
import { ebcdicFromText, textFromEbcdic } from '../../core/recordings/ebcdic';

const PYTHON = '/usr/bin/python3';
const r = spawnSync(PYTHON, ['-c', 'import json; print(json.dumps([ord(bytes([b]).decode("cp037")) for b in range(256)]))'], { encoding: 'utf8' });
const available = r.status === 0;

describe.skipIf(!available)("EBCDIC code page 037 against Python's cp037 codec", () => {
  it('decodes every byte value to the same code point', () => {
    const theirs = JSON.parse(r.stdout) as number[];
    const ours = Array.from(textFromEbcdic(Uint8Array.from({ length: 256 }, (_, i) => i)), (c) => c.charCodeAt(0));
    expect(ours).toEqual(theirs);
  });
  it('encodes every code point back to its byte', () => {
    const theirs = JSON.parse(r.stdout) as number[];
    expect(Array.from(ebcdicFromText(String.fromCharCode(...theirs)))).toEqual(Array.from({ length: 256 }, (_, i) => i));
  });
});

if (!available) {
  describe("EBCDIC code page 037 against Python's cp037 codec", () => {
    it.skip('skipped: /usr/bin/python3 is not installed (scripts/ensure-env.sh installs it with python3-segyio)', () => {});
  });
}
