/**
 * Seismograph files in site bundles (core/exchange/bundle.ts): the recording
 * records always travel with their site, a raw file only when the site
 * chose to send it; both round-trip exactly, the JSON Schema in the repo
 * accepts the file (checked by ajv directly), a file without recordings is
 * written exactly as before, and a bad recording or file is refused with one
 * sentence naming it. Base64 is checked against Node's own encoder (a
 * general-purpose reference) and RFC 4648 §10's test vectors.
 */
import { Buffer } from 'node:buffer';
import { createHash } from 'node:crypto';
import Ajv from 'ajv';
import { describe, expect, it } from 'vitest';
import schema from '../../../../schema/site-bundle.schema.json';
import { bundleToJson, makeBundle, parseBundle, type RecordingFile } from '../../../../core/exchange/bundle';
import { fromBase64, toBase64 } from '../../../../core/exchange/base64';
import type { RecordingRecord, SiteRecord } from '../../../../core/exchange/records';
import { inputError } from '../../../input-error';

function expectInputError(fn: () => unknown, message: string): void {
  expect(inputError(fn).message).toBe(message);
}

const T0 = '2026-05-04T08:00:00.000Z';

const site: SiteRecord = {
  type: 'site',
  id: 'site-quarry-invented',
  rev: 1,
  updatedAt: T0,
  name: 'Invented site: quarry road',
  date: '2026-05-04',
  crew: '',
  notes: '',
  axisUnit: 'hz',
  settings: {},
};

/** Invented raw bytes standing in for a file (their content does not matter to the bundle). */
const raw = Uint8Array.from({ length: 1000 }, (_, i) => (i * 37 + 11) & 255);

function recording(id: string, attach: boolean, bytes = raw): RecordingRecord {
  return {
    type: 'recording',
    id,
    rev: 1,
    updatedAt: T0,
    siteId: site.id,
    name: `${id}.sg2`,
    format: 'seg2',
    byteLength: bytes.length,
    sha256: createHash('sha256').update(bytes).digest('hex'),
    geometry: { format: 'seg2', traces: 2, samples: 100, sample_interval_s: 0.001, delay_s: 0, offsets_m: [2, null], component: 'unknown' },
    overrides: { offsets: { first: 2, spacing: 2 }, component: 'transverse' },
    attach,
    addedAt: T0,
  };
}

function fileOf(rec: RecordingRecord, bytes = raw): RecordingFile {
  return { id: rec.id, sha256: rec.sha256, bytes_base64: toBase64(bytes) };
}

describe('base64 (RFC 4648)', () => {
  it('matches the RFC 4648 §10 test vectors and Node on every length mod 3', () => {
    const vectors: [string, string][] = [['', ''], ['f', 'Zg=='], ['fo', 'Zm8='], ['foo', 'Zm9v'], ['foob', 'Zm9vYg=='], ['fooba', 'Zm9vYmE='], ['foobar', 'Zm9vYmFy']];
    for (const [plain, coded] of vectors) {
      expect(toBase64(new TextEncoder().encode(plain))).toBe(coded);
      expect(new TextDecoder().decode(fromBase64(coded, 'x'))).toBe(plain);
    }
    for (const n of [1, 2, 3, 4, 5, 1000, 20000]) {
      const bytes = raw.length >= n ? raw.slice(0, n) : Uint8Array.from({ length: n }, (_, i) => (i * 7) & 255);
      expect(toBase64(bytes)).toBe(Buffer.from(bytes).toString('base64'));
      expect(fromBase64(toBase64(bytes), 'x')).toEqual(bytes);
    }
  });

  it('refuses text that is not base64, naming the field', () => {
    expectInputError(() => fromBase64('Zm9', 'f'), 'f is not base64: its length must be a multiple of 4.');
    expectInputError(() => fromBase64('Zm<v', 'f'), 'f is not base64: character 3 is not in the base64 alphabet.');
    expectInputError(() => fromBase64('Z=9v', 'f'), 'f is not base64: character 2 is not in the base64 alphabet.');
  });
});

describe('recordings in a bundle', () => {
  it('carries every recording record, and the raw file only where the site chose to send it; both read back exactly', () => {
    const sent = recording('rec-a', true);
    const kept = recording('rec-b', false);
    const bundle = makeBundle([site], { now: new Date(T0), recordings: [kept, sent], recordingFiles: [fileOf(sent), fileOf(kept)] });
    expect(bundle.recordings).toEqual([sent, kept]);
    expect(bundle.recordingFiles).toEqual([fileOf(sent)]);
    const text = bundleToJson(bundle);
    const ajv = new Ajv({ strict: true });
    expect(ajv.validate(schema, JSON.parse(text))).toBe(true);
    const back = parseBundle(text);
    expect(back).toEqual(bundle);
    expect(fromBase64(back.recordingFiles![0].bytes_base64, 'x')).toEqual(raw);
  });

  it('without the site choice no raw file travels, and a bundle without recordings is written as before', () => {
    const rec = recording('rec-a', false);
    const onlyRecords = makeBundle([site], { now: new Date(T0), recordings: [rec], recordingFiles: [fileOf(rec)] });
    expect(onlyRecords.recordingFiles).toBeUndefined();
    expect(parseBundle(bundleToJson(onlyRecords)).recordings).toEqual([rec]);
    const plain = makeBundle([site], { now: new Date(T0) });
    expect(Object.keys(plain)).toEqual(['format', 'version', 'exportedAt', 'caution', 'sites', 'picks', 'estimates']);
    // Recordings of a site left out of the bundle stay out.
    expect(makeBundle([site], { now: new Date(T0), siteIds: [], recordings: [rec] }).recordings).toBeUndefined();
  });

  it('refuses a bad recording or file with one sentence naming it', () => {
    const rec = recording('rec-a', true);
    const good = () => JSON.parse(bundleToJson(makeBundle([site], { now: new Date(T0), recordings: [rec], recordingFiles: [fileOf(rec)] })));
    const cases: [string, (b: ReturnType<typeof good>) => void, string][] = [
      ['a file that is not the recorded one', (b) => (b.recordingFiles[0].bytes_base64 = toBase64(raw.slice(0, 999))), 'The bundle is not valid: recordingFiles[0] holds 999 bytes, but its recording states 1000; the file is cut short or not the one recorded.'],
      ['a file of another hash', (b) => (b.recordingFiles[0].sha256 = '0'.repeat(64)), 'The bundle is not valid: recordingFiles[0].sha256 differs from the SHA-256 its recording states; the file is not the one recorded.'],
      ['a file of no recording', (b) => (b.recordingFiles[0].id = 'nobody'), 'The bundle is not valid: recordingFiles[0].id names recording "nobody", which is not in the file.'],
      ['a recording of a site not in the file', (b) => (b.recordings[0].siteId = 'elsewhere'), 'The bundle is not valid: recordings[0].siteId names site "elsewhere", which is not in the file.'],
      ['offsets that do not match the traces', (b) => (b.recordings[0].geometry.offsets_m = [1]), 'The bundle is not valid: in recordings[0], geometry.offsets_m has 1 offsets for 2 traces; give one per trace (null where unknown).'],
      ['a hostile component', (b) => (b.recordings[0].overrides.component = '<script>'), 'The bundle is not valid: in recordings[0], the component must be one of vertical, inline, crossline, transverse, unknown, but it is "<script>".'],
      ['an unknown field', (b) => (b.recordingFiles[0].extra = 1), 'The bundle is not valid: recordingFiles[0] has an unknown field "extra".'],
    ];
    for (const [, mutate, message] of cases) {
      const b = good();
      mutate(b);
      expectInputError(() => parseBundle(JSON.stringify(b)), message);
    }
  });
});
