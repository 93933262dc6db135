/**
 * Site bundles in the field app: export (a download, or the Web Share API
 * where the device has it) and import (merge by id and revision, the sync
 * rules). Loaded lazily by the sync panel, so the schema validator (ajv)
 * stays out of the app's first download.
 */
import { bundleFileName, bundleToJson, importSummary, makeBundle, parseBundle, planBundleImport } from '../../core/exchange/bundle';
import { isDemoSite } from '../../core/exchange/demo';
import { InputError } from '../../core/shared/errors';
import type { FieldStore } from '../store';

export interface BundleFile {
  name: string;
  text: string;
  sites: number;
  picks: number;
  /** Invented demo sites left out (only when no `siteIds` were given and the demo was not asked for). */
  demoLeftOut: number;
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
  const all = await store.allRecords();
  let ids = siteIds;
  let demoLeftOut = 0;
  if (!ids && !options.includeDemo) {
    const sites = all.filter((r) => r.type === 'site');
    const keep = sites.filter((r) => !isDemoSite(r));
    demoLeftOut = sites.filter((r) => !r.deleted).length - keep.filter((r) => !r.deleted).length;
    ids = keep.map((r) => r.id);
  }
  const bundle = makeBundle(all, { siteIds: ids, exportedBy });
  return { name: bundleFileName(bundle), text: bundleToJson(bundle), sites: bundle.sites.length, picks: bundle.picks.length, demoLeftOut };
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
  const all = await store.allRecords();
  const byId = new Map(all.map((r) => [r.id, r]));
  const plan = planBundleImport(bundle, (id) => byId.get(id));
  const expectedRevs = new Map(plan.writes.map((w) => [w.id, byId.get(w.id)?.rev ?? 0]));
  let skipped: string[];
  try {
    skipped = await store.putIncoming(plan.writes, { expectedRevs, queue: true });
  } catch (e) {
    return { ok: false, message: `Nothing was imported. ${(e as Error).message}` };
  }
  const note = skipped.length > 0 ? ` ${skipped.length} record(s) were being edited at the same moment and were left as they are; import the file again to merge them.` : '';
  return { ok: true, message: importSummary(bundle, plan) + note };
}

/**
 * Hands a bundle to the user: the system share sheet when the device can
 * share files (Web Share API level 2), else a download. Resolves to how.
 */
export async function deliverBundle(file: BundleFile): Promise<'shared' | 'downloaded' | 'cancelled'> {
  const blob = new Blob([file.text], { type: 'application/json' });
  const nav = navigator as Navigator & { canShare?: (data: ShareData) => boolean };
  if (typeof File === 'function' && typeof nav.share === 'function' && typeof nav.canShare === 'function') {
    const shared = new File([blob], file.name, { type: 'application/json' });
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
