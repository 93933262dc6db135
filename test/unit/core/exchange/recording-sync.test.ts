/**
 * The office's checks of a recordings push (core/exchange/recording-sync.ts):
 * malformed bodies, files that do not belong to a record of the push, a
 * hash or size that differs from the record, and files too large to travel
 * are each refused with one sentence naming the field.
 */
import { createHash } from 'node:crypto';
import { describe, expect, it } from 'vitest';
import { toBase64 } from '../../../../core/exchange/base64';
import { checkRecordingsPullQuery, checkRecordingsPushBody, MAX_ATTACHED_FILE_BYTES } from '../../../../core/exchange/recording-sync';
import type { RecordingRecord } from '../../../../core/exchange/records';
import { inputError } from '../../../input-error';

const T0 = '2026-05-04T08:00:00.000Z';
const raw = Uint8Array.from({ length: 300 }, (_, i) => (i * 13) & 255);
const rec: RecordingRecord = {
  type: 'recording',
  id: 'rec-1',
  rev: 1,
  updatedAt: T0,
  siteId: 'site-1',
  name: 'shot.sg2',
  format: 'seg2',
  byteLength: raw.length,
  sha256: createHash('sha256').update(raw).digest('hex'),
  geometry: { format: 'seg2', traces: 1, samples: 10, sample_interval_s: 0.001, delay_s: 0, offsets_m: [5], component: 'transverse' },
  overrides: {},
  attach: true,
  addedAt: T0,
};
const file = { id: rec.id, sha256: rec.sha256, bytes_base64: toBase64(raw) };

describe('a recordings push', () => {
  it('takes records with their files, the bytes decoded', () => {
    const push = checkRecordingsPushBody({ recordings: [rec], files: [file] });
    expect(push.recordings).toEqual([rec]);
    expect(push.files).toEqual([{ id: rec.id, sha256: rec.sha256, bytes: raw }]);
  });

  it('refuses bad bodies and files with a sentence naming the field', () => {
    const cases: [unknown, string][] = [
      [[], 'The recordings push must be a JSON object {recordings, files}, but it is a list.'],
      [{ recordings: 'x' }, 'recordings must be a list of recording records, but it is "x".'],
      [{ recordings: [{ ...rec, attach: 'yes' }] }, 'The record is not valid: recordings[0].attach must be a boolean.'],
      [{ recordings: [rec], files: [{ ...file, id: 'other' }] }, 'files[0].id names recording "other", which is not in this push; send the record with its file.'],
      [{ recordings: [rec], files: [{ ...file, sha256: 'f'.repeat(64) }] }, 'files[0].sha256 differs from the SHA-256 its recording states; the file is not the one recorded.'],
      [{ recordings: [rec], files: [{ ...file, bytes_base64: toBase64(raw.slice(1)) }] }, 'files[0] holds 299 bytes, but its recording states 300; the file is cut short or not the one recorded.'],
      [{ recordings: [{ ...rec, byteLength: MAX_ATTACHED_FILE_BYTES + 1 }], files: [file] }, `files[0] is ${MAX_ATTACHED_FILE_BYTES + 1} bytes; files over ${MAX_ATTACHED_FILE_BYTES} bytes do not travel by sync (their records do).`],
    ];
    for (const [body, message] of cases) expect(inputError(() => checkRecordingsPushBody(body)).message).toBe(message);
    expect(inputError(() => checkRecordingsPullQuery(new URLSearchParams('since=-1'))).message).toBe(
      'since must be a cursor returned by the server (a whole number), but it is "-1".',
    );
  });
});
