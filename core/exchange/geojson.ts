/**
 * Sites as GeoJSON (RFC 7946, Butler et al. 2016): a FeatureCollection with
 * one Point feature per live site that has a location. Coordinates are
 * [longitude, latitude] in WGS 84 degrees (RFC 7946 §3.1.1 and §4), in that
 * order. Sites without a location are left out and counted in the
 * collection's `sites_without_location` member. Properties carry the
 * site's name and date, the estimate summary (the verdict on the thickness, thickness with its 95 %
 * interval, speeds, Vs30) and the site classes, and the caution; the
 * caution is also a foreign member of the collection (RFC 7946 §6.1).
 * Text is data: a GIS shows it as given, nothing in it is markup.
 */
import { CAUTION } from '../shared/caution';
import type { SiteRecord } from './records';
import type { SiteSummary } from './site-summary';

export interface SiteFeatureProperties {
  site_id: string;
  name: string;
  date: string;
  crew: string;
  location_source: 'device' | 'typed';
  location_accuracy_m: number | null;
  estimate_status: SiteSummary['status'] | 'not-computed';
  /** The verdict on the thickness (resolved, rough, unresolved) and its sentence; null without an estimate. */
  verdict: 'resolved' | 'rough' | 'unresolved' | null;
  verdict_text: string | null;
  thickness_m: number | null;
  /** null when the interval is open below (the data do not rule out a thinner layer). */
  thickness_95_low_m: number | null;
  /** null when the interval is open towards depth. */
  thickness_95_high_m: number | null;
  vs1_m_s: number | null;
  vs2_m_s: number | null;
  vs30_m_s: number | null;
  /** null when the data do not bound Vs30 below (an open interval end, core/site/site.ts); read vs30_high_m_s as "at most". */
  vs30_low_m_s: number | null;
  /** null when the data do not bound Vs30 above; read vs30_low_m_s as "at least". */
  vs30_high_m_s: number | null;
  /** Every class the 95 % range allows, slowest first, joined by "/". */
  class_asce7_16: string | null;
  class_asce7_22: string | null;
  class_en1998_1: string | null;
  caution: string;
}

export interface SitesFeatureCollection {
  type: 'FeatureCollection';
  caution: string;
  sites_without_location: number;
  features: Array<{
    type: 'Feature';
    id: string;
    geometry: { type: 'Point'; coordinates: [number, number] };
    properties: SiteFeatureProperties;
  }>;
}

/** JSON has no Infinity or NaN: those become null. */
function num(x: number | undefined): number | null {
  return x === undefined || !Number.isFinite(x) ? null : x;
}

/** The sites as a GeoJSON FeatureCollection; `summaries` (by site id) fill the estimate properties when given. */
export function sitesToGeoJson(sites: readonly SiteRecord[], summaries: ReadonlyMap<string, SiteSummary> = new Map()): SitesFeatureCollection {
  const live = sites.filter((s) => !s.deleted).sort((a, b) => a.date.localeCompare(b.date) || a.name.localeCompare(b.name) || a.id.localeCompare(b.id));
  const located = live.filter((s) => s.location !== undefined);
  return {
    type: 'FeatureCollection',
    caution: CAUTION,
    sites_without_location: live.length - located.length,
    features: located.map((s) => {
      const sum = summaries.get(s.id);
      const f = sum?.figures;
      const loc = s.location!;
      return {
        type: 'Feature',
        id: s.id,
        geometry: { type: 'Point', coordinates: [loc.lon, loc.lat] },
        properties: {
          site_id: s.id,
          name: s.name,
          date: s.date,
          crew: s.crew,
          location_source: loc.source,
          location_accuracy_m: num(loc.accuracy_m),
          estimate_status: sum?.status ?? 'not-computed',
          verdict: sum?.verdict?.level ?? null,
          verdict_text: sum?.verdict?.text ?? null,
          thickness_m: num(sum?.thickness?.best),
          thickness_95_low_m: sum?.thickness?.openLow ? null : num(sum?.thickness?.low95),
          thickness_95_high_m: sum?.thickness?.openHigh ? null : num(sum?.thickness?.high95),
          vs1_m_s: num(sum?.vs1?.best),
          vs2_m_s: num(sum?.vs2?.best),
          vs30_m_s: num(f?.vs30.best),
          vs30_low_m_s: f?.vs30.openLow ? null : num(f?.vs30.low),
          vs30_high_m_s: f?.vs30.openHigh ? null : num(f?.vs30.high),
          class_asce7_16: f ? f.classes.asce7_16.join('/') : null,
          class_asce7_22: f ? f.classes.asce7_22.join('/') : null,
          class_en1998_1: f ? f.classes.en1998_1.join('/') : null,
          caution: CAUTION,
        },
      };
    }),
  };
}
