import { describe, expect, it } from 'vitest';
import Ajv from 'ajv';
import schema from '../../../../schema/site-bundle.schema.json';
import {
  BUNDLE_FORMAT,
  bundleFileName,
  bundleRecords,
  bundleToJson,
  checkRecord,
  importSummary,
  makeBundle,
  parseBundle,
  planBundleImport,
} from '../../../../core/exchange/bundle';
import { CAUTION } from '../../../../core/shared/caution';
import { InputError } from '../../../../core/shared/errors';
import { sitesToGeoJson } from '../../../../core/exchange/geojson';
import { parsePicksCsv, picksToCsv } from '../../../../core/picks/picks';
import { nextRevision, type AnyRecord, type PickRecord, type SiteRecord } from '../../../../core/exchange/records';
import { sitePicks, summariseSite } from '../../../../core/exchange/site-summary';
import { SITES_CSV_COLUMNS, sitesToCsv, summaryToCsv } from '../../../../core/exchange/office-tables';
import { demoPicks } from '../../../../core/exchange/demo';

const T0 = '2026-05-04T08:00:00.000Z';

/** An invented site with a few invented picks. */
function fixture(): { site: SiteRecord; picks: PickRecord[] } {
  const site: SiteRecord = {
    type: 'site',
    id: 'a3f0c1d2-1111-4222-8333-444455556666',
    rev: 1,
    updatedAt: T0,
    name: 'Invented site: Quarry Lane <b>north</b>',
    date: '2026-05-04',
    crew: 'Invented crew',
    notes: '<script>alert("x")</script> & "quotes", commas',
    location: { lat: 51.5, lon: -0.12, source: 'typed' },
    axisUnit: 'hz',
    settings: {},
  };
  const picks: PickRecord[] = [5, 8, 12, 20].map((f, i) => ({
    type: 'pick',
    id: `b7e2-${i}`,
    rev: 1,
    updatedAt: T0,
    siteId: site.id,
    order: i,
    frequency: f,
    velocity: 300 - 5 * f,
    sd: 6,
    kind: 'group',
    mode: 0,
    note: i === 1 ? '<img src=x onerror=alert(1)>' : undefined,
  }));
  for (const p of picks) if (p.note === undefined) delete p.note;
  return { site, picks };
}

function expectInputError(fn: () => unknown, message: string | RegExp): void {
  let caught: unknown;
  try {
    fn();
  } catch (e) {
    caught = e;
  }
  expect(caught).toBeInstanceOf(InputError);
  if (typeof message === 'string') expect((caught as Error).message).toBe(message);
  else expect((caught as Error).message).toMatch(message);
}

describe('site bundle', () => {
  it('writes a file that the JSON Schema in the repo accepts (checked by ajv directly) and that reads back identical', () => {
    const { site, picks } = fixture();
    const bundle = makeBundle([...picks, site], { exportedBy: 'tablet-1', now: new Date(T0) });
    const ajv = new Ajv({ strict: true });
    expect(ajv.validate(schema, JSON.parse(bundleToJson(bundle))), JSON.stringify(ajv.errors)).toBe(true);
    expect(bundle.format).toBe(BUNDLE_FORMAT);
    expect(bundle.caution).toBe(CAUTION);
    const back = parseBundle(bundleToJson(bundle));
    expect(back).toEqual(bundle);
    expect(bundleRecords(back)).toEqual([site, ...picks]);
    expect(bundleFileName(bundle)).toBe('shearfield-invented-site-quarry-lane-b-north-b-2026-05-04.json');
  });

  it('names a one-site bundle file after the site in whole words, at most 40 characters', () => {
    const { site } = fixture();
    const long = makeBundle([{ ...site, name: 'Invented: Upper Kestrel terrace, northern embankment line 4' }], { now: new Date(T0) });
    expect(bundleFileName(long)).toBe('shearfield-invented-upper-kestrel-terrace-northern-2026-05-04.json');
    const oneWord = makeBundle([{ ...site, name: 'x'.repeat(60) }], { now: new Date(T0) });
    expect(bundleFileName(oneWord)).toBe(`shearfield-${'x'.repeat(40)}-2026-05-04.json`);
  });

  it('keeps markup in notes as plain text', () => {
    const { site, picks } = fixture();
    const back = parseBundle(bundleToJson(makeBundle([site, ...picks])));
    expect(back.sites[0].notes).toBe('<script>alert("x")</script> & "quotes", commas');
    expect(back.picks[1].note).toBe('<img src=x onerror=alert(1)>');
  });

  it('merges by id and revision on import: nothing duplicated, nothing newer overwritten', () => {
    const { site, picks } = fixture();
    const store = new Map<string, AnyRecord>();
    const newer = nextRevision(site, { notes: 'edited later' }, new Date('2026-05-05T00:00:00Z'));
    store.set(site.id, newer);
    const bundle = parseBundle(bundleToJson(makeBundle([site, ...picks])));
    const plan = planBundleImport(bundle, (id) => store.get(id));
    expect(plan.writes.map((w) => w.id).sort()).toEqual(picks.map((p) => p.id).sort());
    expect(plan.outcomes[0]).toMatchObject({ id: site.id, action: 'ignore', reason: 'older than the stored revision' });
    expect(importSummary(bundle, plan)).toBe('Read 1 site, 4 picks and 0 estimates: 4 new or newer, 1 already here or older.');
    for (const w of plan.writes) store.set(w.id, w);
    const again = planBundleImport(bundle, (id) => store.get(id));
    expect(again.writes).toEqual([]);
    expect(store.get(site.id)).toBe(newer);
  });

  describe('refuses bad files with one clear sentence', () => {
    const good = () => bundleToJson(makeBundle([fixture().site, ...fixture().picks], { now: new Date(T0) }));
    const cases: Array<[string, () => unknown, string | RegExp]> = [
      ['a truncated file', () => good().slice(0, 300), 'The bundle file ends too early: it looks cut short (truncated). Export it again and copy the whole file.'],
      ['an empty file', () => '  ', 'The bundle file is empty.'],
      ['a non-text value', () => 42, 'The bundle file must be text (JSON).'],
      ['a JSON list', () => '[1,2]', 'The bundle file must hold a JSON object, but it holds a list.'],
      ['another kind of file', () => '{"type":"FeatureCollection"}', 'This is not a Shearfield site bundle: its format field is nothing, expected "shearfield-site-bundle".'],
      [
        'a future format version',
        () => good().replace('"version":1', '"version":7'),
        'The bundle uses format version 7, newer than version 1 that this copy of Shearfield reads; update Shearfield to import it.',
      ],
      ['a velocity given as text', () => good().replace('"velocity":275', '"velocity":"275"'), 'The bundle is not valid: picks[0].velocity must be a number.'],
      ['a fractional mode', () => good().replace('"mode":0', '"mode":0.5'), 'The bundle is not valid: picks[0].mode must be a whole number.'],
      ['an unknown kind', () => good().replace('"kind":"group"', '"kind":"rayleigh"'), 'The bundle is not valid: picks[0].kind must be one of "group", "phase".'],
      ['a missing site name', () => good().replace(/"name":"[^"]*",/, ''), 'The bundle is not valid: sites[0] is missing the required field name.'],
      ['a site name that is a number', () => good().replace(/"name":"[^"]*"/, '"name":12'), 'The bundle is not valid: sites[0].name must be text.'],
      ['an id with markup', () => good().replace('"id":"b7e2-0"', '"id":"<b>x</b>"'), 'The bundle is not valid: picks[0].id must be an id of 1–100 letters, digits and . _ : - (starting with a letter or digit).'],
      ['an unknown top-level field', () => good().replace('"caution"', '"payload":"<script>","caution"'), 'The bundle is not valid: the bundle has an unknown field "payload".'],
      ['a pick of a site not in the file', () => good().replace('"siteId":"a3f0c1d2-1111-4222-8333-444455556666"', '"siteId":"zz"'), 'The bundle is not valid: picks[0].siteId names site "zz", which is not in the file.'],
      [
        'a velocity in km/s',
        () => good().replace('"velocity":275', '"velocity":0.275'),
        "The bundle's picks[0], column velocity_m_s: is 0.275 m/s, below the 30 m/s lower bound. It looks like km/s; the velocity must be given in m/s (the value was not converted).",
      ],
      [
        'a record given twice',
        () => {
          const b = JSON.parse(good());
          b.picks.push(b.picks[0]);
          return JSON.stringify(b);
        },
        'The bundle is not valid: picks[4].id repeats the id "b7e2-0" of picks[0]; each record appears once.',
      ],
    ];
    for (const [what, make, message] of cases) {
      it(what, () => expectInputError(() => parseBundle(make()), message));
    }
  });

  it('checks a single pushed record against the same schema', () => {
    const { picks } = fixture();
    expect(checkRecord(picks[0], 'records[0]')).toBe(picks[0]);
    expectInputError(() => checkRecord({ ...picks[0], rev: 0 }, 'records[3]'), 'The record is not valid: records[3].rev must be at least 1.');
    expectInputError(() => checkRecord({ ...picks[0], type: 'note' }, 'records[3]'), 'The record is not valid: records[3].type must be "site", "pick" or "estimate", but it is "note".');
    expectInputError(() => checkRecord('x', 'records[0]'), 'The record is not valid: records[0] must be an object, but it is "x".');
  });
});

describe('exports', () => {
  it('picks CSV per site round-trips exactly through the core parser', () => {
    const { site, picks } = fixture();
    const own = sitePicks(site.id, picks);
    const parsed = parsePicksCsv(picksToCsv(own)).picks;
    expect(parsed).toEqual(own);
  });

  it('GeoJSON follows RFC 7946: a FeatureCollection of Points at [lon, lat], with the caution', () => {
    const { site } = fixture();
    const noPlace: SiteRecord = { ...site, id: 'no-place', location: undefined };
    const gone: SiteRecord = { ...site, id: 'gone', deleted: true };
    const fc = sitesToGeoJson([site, noPlace, gone]);
    expect(fc.type).toBe('FeatureCollection');
    expect(fc.caution).toBe(CAUTION);
    expect(fc.sites_without_location).toBe(1);
    expect(fc.features).toHaveLength(1);
    expect(fc.features[0].geometry).toEqual({ type: 'Point', coordinates: [-0.12, 51.5] });
    expect(fc.features[0].properties).toMatchObject({ name: site.name, date: '2026-05-04', estimate_status: 'not-computed', verdict: null, verdict_text: null, caution: CAUTION });
  });

  it('the summary and sites tables carry the estimate, the classes, the caution, and defuse spreadsheet formulas', () => {
    const { site } = fixture();
    const picks: PickRecord[] = demoPicks().map((p, i) => ({ ...p, type: 'pick', id: `d${i}`, rev: 1, updatedAt: T0, siteId: site.id, order: i }));
    const evil: SiteRecord = { ...site, crew: '=HYPERLINK("http://x")' };
    const summary = summariseSite(evil, picks);
    expect(summary.status).toBe('estimated');
    const csv = summaryToCsv([summary, summariseSite({ ...site, id: 'empty' }, [])]);
    const lines = csv.trimEnd().split('\r\n');
    expect(lines).toHaveLength(3);
    expect(lines[0].startsWith('site_id,name,date,picks,status,verdict,verdict_text,thickness_m')).toBe(true);
    expect(lines[1]).toContain(CAUTION);
    expect(lines[2]).toContain('no-picks');
    expect(lines[2]).toContain('The site has no picks yet.');
    const sites = sitesToCsv([evil], picks).trimEnd().split('\r\n');
    expect(sites[0]).toBe(SITES_CSV_COLUMNS.join(','));
    expect(sites[1]).toContain(`"'=HYPERLINK(""http://x"")"`);
    const fc = sitesToGeoJson([evil], new Map([[site.id, summary]]));
    expect(fc.features[0].properties.estimate_status).toBe('estimated');
    expect(fc.features[0].properties.verdict).toBe(summary.verdict!.level);
    expect(fc.features[0].properties.verdict_text).toBe(summary.verdict!.text);
    expect(summary.verdict!.text).toMatch(/^Layer thickness (resolved|only roughly known|not resolved)/);
    expect(fc.features[0].properties.thickness_m).toBe(summary.thickness!.best);
    expect(fc.features[0].properties.class_en1998_1).toBe(summary.figures!.classes.en1998_1.join('/'));
  });
});
