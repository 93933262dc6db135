/**
 * Site bundles in the field app: export (a download, or the Web Share API
 * where the device has it) and import (merge by id and revision, the sync
 * rules). Loaded lazily by the sync panel, so the schema validator (ajv)
 * stays out of the app's first download.
 */
import {
  bundleFileName,
  bundleToJson,
  importSummary,
  makeBundle,
  MAX_BUNDLE_CHARS,
  parseBundle,
  planBundleImport,
  type RecordingFile,
} from '../../core/exchange/bundle';
import { fromBase64, toBase64 } from '../../core/exchange/base64';
import { isDemoSite } from '../../core/exchange/records';
import type { AnyRecord, RecordingRecord } from '../../core/exchange/records';
import { planMerge } from '../../core/exchange/sync';
import { InputError } from '../../core/shared/errors';
import type { FieldStore } from '../store';
import { sha256Hex } from '../store/recordings';

/** Room left in a bundle for the records themselves when raw files are packed in (characters; common practice for this tool). */
const RECORDS_ROOM_CHARS = 8 * 1024 * 1024;

export interface BundleFile {
  name: string;
  text: string;
  sites: number;
  picks: number;
  /** Invented demo sites left out (only when no `siteIds` were given and the demo was not asked for). */
  demoLeftOut: number;
  /** Recordings carried, and how many of them with their raw file. */
  recordings: number;
  recordingFiles: number;
  /** Raw files the sites chose to send that did not fit in one bundle (their records still travel). */
  filesLeftOut: number;
  /** Raw files the sites chose to send that this device does not hold (they arrived without them). */
  filesMissing: number;
}

/**
 * The raw files to carry: those of live recordings whose site chose to
 * send them and that this device holds, oldest first, as many as fit in
 * one bundle (MAX_BUNDLE_CHARS, less room for the records).
 */
async function filesToCarry(
  store: FieldStore,
  recordings: readonly RecordingRecord[],
): Promise<{ files: RecordingFile[]; leftOut: number; missing: number }> {
  const wanted = recordings.filter((r) => r.attach && !r.deleted).sort((a, b) => (a.addedAt < b.addedAt ? -1 : 1));
  const files: RecordingFile[] = [];
  let budget = MAX_BUNDLE_CHARS - RECORDS_ROOM_CHARS;
  let leftOut = 0;
  let missing = 0;
  for (const r of wanted) {
    const chars = Math.ceil(r.byteLength / 3) * 4 + 200;
    if (chars > budget) {
      leftOut++;
      continue;
    }
    const bytes = await store.recordingBytes(r.id);
    if (!bytes) {
      missing++;
      continue;
    }
    files.push({ id: r.id, sha256: r.sha256, bytes_base64: toBase64(bytes) });
    budget -= chars;
  }
  return { files, leftOut, missing };
}

/**
 * The bundle of every site on the tablet (or only `siteIds`), deletions and
 * kept conflicts included. "Every site" leaves the invented demo site out
 * unless `includeDemo` is set; a demo site named in `siteIds` is included.
 */
export async function exportBundle(
  store: FieldStore,
  siteIds?: readonly string[],
  exportedBy?: string,
  options: { includeDemo?: boolean } = {},
): Promise<BundleFile> {
  // Marked as a send: a site revision that leaves in the bundle is never amended afterwards.
  const all = await store.whileSending(() => store.allRecords());
  let ids = siteIds;
  let demoLeftOut = 0;
  if (!ids && !options.includeDemo) {
    const sites = all.filter((r) => r.type === 'site');
    const keep = sites.filter((r) => !isDemoSite(r));
    demoLeftOut = sites.filter((r) => !r.deleted).length - keep.filter((r) => !r.deleted).length;
    ids = keep.map((r) => r.id);
  }
  const keep = new Set(ids ?? all.filter((r) => r.type === 'site').map((r) => r.id));
  const recordings = (await store.allRecordings()).filter((r) => keep.has(r.siteId));
  const { files, leftOut, missing } = await filesToCarry(store, recordings);
  const bundle = makeBundle(all, { siteIds: ids, exportedBy, recordings, recordingFiles: files });
  return {
    name: bundleFileName(bundle),
    text: bundleToJson(bundle),
    sites: bundle.sites.length,
    picks: bundle.picks.length,
    demoLeftOut,
    recordings: bundle.recordings?.length ?? 0,
    recordingFiles: bundle.recordingFiles?.length ?? 0,
    filesLeftOut: leftOut,
    filesMissing: missing,
  };
}

export interface ImportOutcome {
  ok: boolean;
  /** A plain sentence for the crew: what was imported, or why nothing was. */
  message: string;
}

/**
 * Reads a bundle and merges it into the store in one transaction. An
 * invalid file changes nothing; the message says why. Imported records are
 * queued for the office too (it may not have them yet).
 */
export async function importBundleText(store: FieldStore, text: string): Promise<ImportOutcome> {
  let bundle;
  try {
    bundle = parseBundle(text);
  } catch (e) {
    if (e instanceof InputError) return { ok: false, message: `Nothing was imported. ${e.message}` };
    throw e;
  }
  // Each raw file must be the one its recording names (SHA-256) before anything is written.
  const files = new Map<string, { sha256: string; bytes: Uint8Array }>();
  for (const [i, f] of (bundle.recordingFiles ?? []).entries()) {
    const bytes = fromBase64(f.bytes_base64, `recordingFiles[${i}].bytes_base64`).slice();
    if ((await sha256Hex(bytes)) !== f.sha256) {
      return { ok: false, message: `Nothing was imported. The bundle is not valid: recordingFiles[${i}] does not have the SHA-256 its recording states; the file was changed after it was written.` };
    }
    files.set(f.id, { sha256: f.sha256, bytes });
  }
  const all = await store.allRecords();
  const byId = new Map(all.map((r) => [r.id, r]));
  const plan = planBundleImport(bundle, (id) => byId.get(id));
  const storedRecordings = new Map((await store.allRecordings()).map((r) => [r.id, r]));
  const recordingPlan = planMerge((bundle.recordings ?? []) as unknown as AnyRecord[], (id) => storedRecordings.get(id) as unknown as AnyRecord | undefined, {
    from: (bundle.exportedBy ? `bundle from ${bundle.exportedBy}` : `bundle of ${bundle.exportedAt}`).slice(0, 200),
  });
  const writes = [...plan.writes, ...(recordingPlan.writes as unknown as RecordingRecord[])];
  const expectedRevs = new Map(writes.map((w) => [w.id, (byId.get(w.id) ?? storedRecordings.get(w.id))?.rev ?? 0]));
  let skipped: string[];
  try {
    skipped = await store.putIncoming(writes, { expectedRevs, queue: true, files });
  } catch (e) {
    return { ok: false, message: `Nothing was imported. ${(e as Error).message}` };
  }
  const note = skipped.length > 0 ? ` ${skipped.length} record(s) were being edited at the same moment and were left as they are; import the file again to merge them.` : '';
  const recs = bundle.recordings?.length ?? 0;
  const withFiles = recs > 0 ? ` It carried ${recs} seismograph file record(s), ${files.size} with the raw file.` : '';
  return { ok: true, message: importSummary(bundle, plan) + withFiles + note };
}

/**
 * Hands a bundle to the user: the system share sheet when the device can
 * share files (Web Share API level 2), else a download. Resolves to how.
 */
export async function deliverBundle(file: Pick<BundleFile, 'name' | 'text'>, type = 'application/json'): Promise<'shared' | 'downloaded' | 'cancelled'> {
  const blob = new Blob([file.text], { type });
  const nav = navigator as Navigator & { canShare?: (data: ShareData) => boolean };
  if (typeof File === 'function' && typeof nav.share === 'function' && typeof nav.canShare === 'function') {
    const shared = new File([blob], file.name, { type });
    if (nav.canShare({ files: [shared] })) {
      try {
        await nav.share({ files: [shared], title: file.name });
        return 'shared';
      } catch (e) {
        if ((e as DOMException)?.name === 'AbortError') return 'cancelled';
        // Sharing failed for another reason: fall back to a download.
      }
    }
  }
  const url = URL.createObjectURL(blob);
  const a = document.createElement('a');
  a.href = url;
  a.download = file.name;
  a.rel = 'noopener';
  document.body.append(a);
  a.click();
  a.remove();
  setTimeout(() => URL.revokeObjectURL(url), 10_000);
  return 'downloaded';
}
