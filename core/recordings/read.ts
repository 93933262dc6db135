/**
 * The one entry the app and the office call: reads a seismograph file of
 * any supported format into a Recording, then applies the user's geometry.
 *
 * The format: the SEG-2 block id 0x3A55 at byte 0 (either byte order) makes
 * it SEG-2; otherwise the name's extension .sgy/.segy or .sg2/.seg2 picks
 * that reader (so a damaged file gets that format's message); otherwise
 * text without control bytes in its first 4 kB is CSV traces (a SEG-Y
 * file's binary header holds zero bytes there), and a known format code at
 * byte 3224 is SEG-Y.
 */
import { InputError } from '../shared/errors';
import { looksLikeText, readCsvTraces, textOfBytes } from './csv-traces';
import { applyOverrides, MAX_RECORDING_BYTES, type GeometryOverrides, type Recording } from './recording';
import { looksLikeSeg2, readSeg2 } from './seg2-read';
import { looksLikeSegy, readSegy } from './segy-read';

export { MAX_RECORDING_BYTES };

/** Reads a recording and applies `overrides`. Throws one InputError (naming the byte offset, key, row or field) for a bad file or override. */
export function readRecording(data: Uint8Array | ArrayBuffer, name: string, overrides: GeometryOverrides = {}): Recording {
  const bytes = data instanceof Uint8Array ? data : new Uint8Array(data);
  if (bytes.length === 0) throw new InputError('file', `The file "${name}" is empty.`);
  if (bytes.length > MAX_RECORDING_BYTES) {
    throw new InputError('file', `The file "${name}" is ${bytes.length} bytes; recordings of at most ${MAX_RECORDING_BYTES} bytes are read.`);
  }
  const ext = /\.([a-z0-9]+)$/i.exec(name)?.[1].toLowerCase() ?? '';
  let rec: Recording;
  if (looksLikeSeg2(bytes)) rec = readSeg2(bytes, name);
  else if (ext === 'sgy' || ext === 'segy') rec = readSegy(bytes, name);
  else if (ext === 'sg2' || ext === 'seg2') rec = readSeg2(bytes, name);
  else if (looksLikeText(bytes)) rec = readCsvTraces(textOfBytes(bytes), name);
  else if (looksLikeSegy(bytes)) rec = readSegy(bytes, name);
  else {
    throw new InputError(
      'file',
      `The file "${name}" is not a recording this app reads: it has no SEG-2 block id 0x3A55 at byte offset 0, no SEG-Y format code at byte offset 3224, and it is not CSV text.`,
    );
  }
  return applyOverrides(rec, overrides);
}
