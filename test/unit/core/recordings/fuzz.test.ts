/**
 * Hostile and damaged files: 10 000 seeded mutations of a good file per
 * reader (SEG-Y, SEG-2, CSV traces). Each must give a Recording or one
 * InputError, never another exception or a hang, and a Recording never
 * holds more Float64 samples than 16 times the file's bytes (the readers'
 * cap on padding; common practice for "a small multiple of the file size").
 * Mutations: random bytes set, 16- and 32-bit words set to extremes (0,
 * −1, 0x7FFF…, 0x8000…) at aligned places, truncation, and a chunk copied
 * over another. Seeded with Mulberry32 (core/shared/random.ts).
 */
import { describe, expect, it } from 'vitest';
import { readCsvTraces, textOfBytes } from '../../../../core/recordings/csv-traces';
import { readRecording } from '../../../../core/recordings/read';
import type { Recording } from '../../../../core/recordings/recording';
import { readSeg2 } from '../../../../core/recordings/seg2-read';
import { writeSeg2 } from '../../../../core/recordings/seg2-write';
import { readSegy } from '../../../../core/recordings/segy-read';
import { writeSegy } from '../../../../core/recordings/segy-write';
import { InputError } from '../../../../core/shared/errors';
import { mulberry32 } from '../../../../core/shared/random';

const MUTATIONS = 10_000;
/** A few seconds on an idle machine; the 2-core CI box shared with other jobs can be many times slower. */
const BUSY_MACHINE = { timeout: 120_000 };
const EXTREMES16 = [0, 0xffff, 0x7fff, 0x8000, 1];
const EXTREMES32 = [0, 0xffffffff, 0x7fffffff, 0x80000000, 1, 0x7f800000 /* +Inf as float32 */, 0x7fc00000 /* NaN */];

function mutate(good: Uint8Array, rand: () => number, hot: number[]): Uint8Array {
  const pick = (n: number) => Math.floor(rand() * n);
  const kind = pick(5);
  let b = good.slice();
  const v = new DataView(b.buffer);
  // Half the word mutations land on the format's header fields, where damage matters most.
  const at = (size: number) => {
    const p = rand() < 0.5 && hot.length > 0 ? hot[pick(hot.length)] : pick(b.length - size);
    return Math.max(0, Math.min(p, b.length - size));
  };
  switch (kind) {
    case 0:
      for (let i = 1 + pick(4); i > 0; i--) b[pick(b.length)] = pick(256);
      break;
    case 1:
      v.setUint16(at(2), EXTREMES16[pick(EXTREMES16.length)], rand() < 0.5);
      break;
    case 2:
      v.setUint32(at(4), EXTREMES32[pick(EXTREMES32.length)], rand() < 0.5);
      break;
    case 3:
      b = b.slice(0, pick(b.length));
      break;
    case 4: {
      const len = 1 + pick(64);
      const from = pick(Math.max(1, b.length - len));
      b.copyWithin(pick(Math.max(1, b.length - len)), from, from + len);
      break;
    }
  }
  return b;
}

function fuzz(label: string, good: Uint8Array, hot: number[], read: (b: Uint8Array) => Recording, seed: number): void {
  const rand = mulberry32(seed);
  let ok = 0;
  let refused = 0;
  for (let i = 0; i < MUTATIONS; i++) {
    const bytes = mutate(good, rand, hot);
    let rec: Recording;
    try {
      rec = read(bytes);
    } catch (e) {
      if (!(e instanceof InputError)) throw new Error(`${label}: mutation ${i} (seed ${seed}) threw ${String(e)}, not an InputError`);
      if (e.message.length < 10 || e.message.includes('\n')) throw new Error(`${label}: mutation ${i} gave the message ${JSON.stringify(e.message)}, not one sentence`);
      refused++;
      continue;
    }
    ok++;
    const floats = rec.traces.reduce((a, t) => a + t.length, 0);
    if (floats * 8 > 16 * bytes.length) throw new Error(`${label}: mutation ${i} (seed ${seed}) allocated ${floats * 8} bytes for a ${bytes.length}-byte file`);
    for (const t of rec.traces) if (t.length !== rec.samples) throw new Error(`${label}: mutation ${i}: a trace of ${t.length} samples, not ${rec.samples}`);
  }
  // Both outcomes must occur, or the mutations test nothing.
  expect(ok).toBeGreaterThan(100);
  expect(refused).toBeGreaterThan(100);
}

/** Samples per trace: small files keep 10 000 mutations quick on a busy machine; the header fields are what mutations probe. */
const N = 20;
const traces = Array.from({ length: 4 }, (_, k) => Array.from({ length: N }, (_, i) => Math.round(1000 * Math.sin(0.3 * i + k))));

describe('10 000 mutations per reader: a Recording or one InputError, bounded allocation', () => {
  it('SEG-Y (rev 2, little-endian, extended header, variable lengths)', BUSY_MACHINE, () => {
    const good = writeSegy(
      { sampleInterval: 0.0005, delay: 0, traces: [...traces.slice(0, 3), traces[3].slice(0, 12)], offsets: [2, 4, 6, 8], component: 'transverse' },
      { revision: 2, littleEndian: true, format: 5, variableLengths: true, extendedHeaders: ['invented'], extendedForm: 'variable' },
    );
    const hot = [3212, 3216, 3220, 3224, 3254, 3268, 3272, 3296, 3500, 3502, 3504, 3506, 3512, 3520, 3528];
    for (const base of [6800, 6800 + 240 + N * 4]) hot.push(base + 28, base + 36, base + 70, base + 108, base + 114, base + 116, base + 214);
    fuzz('SEG-Y', good, hot, (b) => readSegy(b, 'f.sgy'), 1201);
  });
  it('SEG-Y (rev 1, big-endian, IBM float) through readRecording', BUSY_MACHINE, () => {
    const good = writeSegy({ sampleInterval: 0.001, delay: 0.01, traces, offsets: [1, 2, 3, 4] }, { revision: 1, format: 1 });
    fuzz('SEG-Y IBM', good, [3216, 3220, 3224, 3502, 3504, 3600 + 114, 3600 + 108], (b) => readRecording(b, 'f.sgy'), 1202);
  });
  it('SEG-2 (formats 3 and 4)', BUSY_MACHINE, () => {
    for (const [format, seed] of [
      [4, 1203],
      [3, 1204],
    ] as const) {
      const good = writeSeg2({ sampleInterval: 0.00025, delay: -0.01, traces, offsets: [5, 6, 7, 8] }, { format });
      const v = new DataView(good.buffer);
      const hot = [0, 4, 6, 8, 32, 36, 40, 44];
      for (let k = 0; k < 4; k++) {
        const t = v.getUint32(32 + 4 * k, true);
        hot.push(t, t + 2, t + 4, t + 8, t + 12, t + 32);
      }
      fuzz(`SEG-2 format ${format}`, good, hot, (b) => readSeg2(b, 'f.sg2'), seed);
    }
  });
  it('CSV traces', BUSY_MACHINE, () => {
    let text = 'time_s,5,6,7,8\n';
    for (let i = 0; i < N; i++) text += [i * 0.001, ...traces.map((t) => t[i])].join(',') + '\n';
    const good = Uint8Array.from(text, (c) => c.charCodeAt(0));
    fuzz('CSV', good, [], (b) => readCsvTraces(textOfBytes(b), 'f.csv'), 1205);
  });
});
