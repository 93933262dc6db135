/**
 * Office exports and the command line (issue 11, items 7–9, 11 and 12),
 * with real parts: records pushed through the office server process on a
 * free port of 127.0.0.1 into a real SQLite file, then the shearfield
 * commands on that file.
 */
import Database from 'better-sqlite3';
import { existsSync, readdirSync, readFileSync, statSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import { MAX_RECORD_DEPTH } from '../../core/exchange/record-limits';
import type { AnyRecord, EstimateRecord, PickRecord, SiteRecord } from '../../core/exchange/records';
import { parsePicksCsv } from '../../core/picks/picks';
import { DB_FILE_NAME } from '../../office/store';
import { addDevice, cli, query, removeTempDataDirs, snapshot, startOffice, tempDataDir, type OfficeProcess } from './office-harness';

const T = '2026-05-09T08:00:00.000Z';
const offices: OfficeProcess[] = [];

afterAll(async () => {
  for (const o of offices) await o.kill();
  removeTempDataDirs();
});

function site(id: string, extra: Partial<SiteRecord> = {}): SiteRecord {
  return { type: 'site', id, rev: 1, updatedAt: T, name: `Invented export site ${id}`, date: '2026-05-09', crew: 'Invented crew', notes: '', axisUnit: 'hz', settings: {}, ...extra };
}

function pick(id: string, siteId: string, k: number, note?: string): PickRecord {
  const p: PickRecord = { type: 'pick', id, rev: 1, updatedAt: T, siteId, order: k, frequency: 4 + k * 0.5, velocity: 290 - k, sd: 6, kind: 'group', mode: 0 };
  if (note !== undefined) p.note = note;
  return p;
}

async function pushAll(records: AnyRecord[]): Promise<string> {
  const data = tempDataDir();
  const token = await addDevice(data, 'export-tablet');
  const srv = await startOffice(data);
  offices.push(srv);
  const res = await fetch(`${srv.url}/api/v1/push`, {
    method: 'POST',
    headers: { Authorization: `Bearer ${token}`, 'Content-Type': 'application/json' },
    body: JSON.stringify({ batchId: 'export-batch', records }),
  });
  expect(res.status, JSON.stringify(await res.clone().json())).toBe(200);
  await srv.stop();
  return data;
}

/**
 * Every cell a spreadsheet could make of a line when it splits on `sep`
 * and ignores quotes that do not open a cell (as it does in a file written
 * for another separator); NFKC folds full-width ＝ into =.
 */
function cellsSplitOn(text: string, sep: string): string[] {
  return text
    .split(/\r?\n/)
    .flatMap((line) => line.split(sep))
    .map((c) => c.normalize('NFKC').replace(/^\s+/, '').replace(/^"/, '').replace(/^\s+/, ''));
}

describe('7. exports meant for spreadsheets start no formula, whatever the separator', () => {
  it('sites.csv and picks/*.csv guard every text cell; picks-raw/ and the bundle keep the exact text', async () => {
    const hostile = ["=cmd|' /C calc'!A0", '@SUM(A1:A9)', '+HYPERLINK("http://example.invalid","x")', '-2+3', '  =1+1', '＝1+1', 'ok; =1+1', 'tab\t=1+1|@x'];
    const s1 = site('csv-site', { name: 'Survey A;=1+1;B', crew: '\t=crew', notes: 'line one\n=2+2 and ＠x; ＋y' });
    const picks = hostile.map((note, k) => pick(`csv-p${k}`, 'csv-site', k, note));
    const data = await pushAll([s1, ...picks]);
    const out = join(data, 'export');
    const r = await cli(['sites-export', out, '--data', data, '--no-estimate']);
    expect(r.code, r.err).toBe(0);
    const forSheets = [readFileSync(join(out, 'sites.csv'), 'utf8'), readFileSync(join(out, 'picks', 'csv-site.csv'), 'utf8')];
    for (const text of forSheets) {
      for (const sep of [',', ';', '\t', '|']) {
        for (const cell of cellsSplitOn(text, sep)) expect(cell, `split on ${JSON.stringify(sep)}`).not.toMatch(/^[=+\-@]/);
      }
    }
    // Still readable: the guard only adds apostrophes.
    const guarded = parsePicksCsv(forSheets[1]).picks.map((p) => p.note);
    expect(guarded[0]).toBe("'=cmd|' /C calc'!A0");
    expect(guarded[6]).toBe("ok; '=1+1");
    // The exact text stays available: picks-raw/ reads back exactly, as the bundle does.
    expect(parsePicksCsv(readFileSync(join(out, 'picks-raw', 'csv-site.csv'), 'utf8')).picks.map((p) => p.note)).toEqual(hostile);
    const bundleFile = join(out, 'all.json');
    expect((await cli(['bundle-export', bundleFile, '--data', data])).code).toBe(0);
    const bundle = JSON.parse(readFileSync(bundleFile, 'utf8'));
    expect(bundle.sites[0].name).toBe('Survey A;=1+1;B');
    expect(bundle.picks.map((p: PickRecord) => p.note)).toEqual(hostile);
  });
});

describe('8. picks file names never collide', () => {
  it('sites "a:b" and "a_b" write two files and the count printed is the count written; names differing only in case stop the export before anything is written', async () => {
    const data = await pushAll([site('a:b'), site('a_b'), pick('ab-1', 'a:b', 0), pick('ab-2', 'a_b', 0), site('lonely')]);
    const out = join(data, 'export');
    const r = await cli(['sites-export', out, '--data', data, '--no-estimate']);
    expect(r.code, r.err).toBe(0);
    expect(readdirSync(join(out, 'picks')).sort()).toEqual(['a%3Ab.csv', 'a_b.csv']);
    expect(readdirSync(join(out, 'picks-raw')).sort()).toEqual(['a%3Ab.csv', 'a_b.csv']);
    expect(r.out).toBe(
      `Wrote 3 sites to ${join(out, 'sites.csv')} and ${join(out, 'sites.geojson')}, and 2 picks files to ${join(out, 'picks')} (for spreadsheets) and 2 to ${join(out, 'picks-raw')} (exact text).\n`,
    );
    expect(parsePicksCsv(readFileSync(join(out, 'picks-raw', 'a%3Ab.csv'), 'utf8')).picks.map((p) => p.id)).toEqual(['ab-1']);

    const cased = await pushAll([site('Case-1'), site('case-1'), pick('c1', 'Case-1', 0), pick('c2', 'case-1', 0)]);
    const out2 = join(cased, 'export');
    expect(await cli(['sites-export', out2, '--data', cased, '--no-estimate'])).toEqual({
      code: 1,
      out: '',
      err: 'shearfield sites-export: Sites "Case-1" and "case-1" would write picks files whose names differ only in letter case, which many disks treat as one file; nothing was exported. Export one of them on its own with shearfield bundle-export --site.\n',
    });
    expect(existsSync(out2)).toBe(false);
  });
});

describe('9. revoking a device names it without ambiguity', () => {
  it('a word that is one device\'s id and another\'s name is refused and nothing is revoked; --id and --name say which', async () => {
    const data = tempDataDir();
    await addDevice(data, 'Alpha');
    await addDevice(data, 'Bravo');
    await addDevice(data, '1');
    const before = snapshot(data);
    expect(await cli(['device', 'revoke', '1', '--data', data])).toEqual({
      code: 1,
      out: '',
      err: 'shearfield device: "1" is the id of device 1 ("Alpha") and the name of device 3 ("1"); say which with --id 1 or --name "1". Nothing was changed.\n',
    });
    expect(snapshot(data)).toBe(before);
    const byName = await cli(['device', 'revoke', '--name', '1', '--data', data]);
    expect(byName.out).toMatch(/^Revoked device 3: 1 \(added .+, last batch none, revoked .+\)\. Its token no longer works\.\n$/);
    const byId = await cli(['device', 'revoke', '--id', '1', '--data', data]);
    expect(byId.out).toMatch(/^Revoked device 1: Alpha \(added /);
    expect(query(data, 'SELECT name FROM devices WHERE revoked_at IS NULL')).toEqual([{ name: 'Bravo' }]);
    expect((await cli(['device', 'revoke', '--id', '1', '--data', data])).out).toMatch(/^Device 1: Alpha was already revoked \(since .+\); nothing changed\.\n$/);
    expect((await cli(['device', 'revoke', '--id', '9', '--data', data])).err).toBe('shearfield device: No device has the id "9"; see shearfield device list.\n');
    expect((await cli(['device', 'revoke', 'Bravo', '--name', 'Bravo', '--data', data])).code).toBe(1);
  });
});

describe('11. the office\'s own bundle export always imports again', () => {
  it('about 64 kB of deep but allowed records export to a file of about their size, which imports into a fresh store', async () => {
    const records: AnyRecord[] = [site('size-site')];
    let nested: Record<string, unknown> = { v: 1 };
    for (let i = 0; i < MAX_RECORD_DEPTH - 2; i++) nested = { d: nested };
    for (let k = 0; k < 200; k++) {
      const e: EstimateRecord = { type: 'estimate', id: `size-est-${k}`, rev: 1, updatedAt: T, siteId: 'size-site', settings: {}, summary: nested, computedAt: T };
      records.push(e);
    }
    const recordChars = records.reduce((n, r) => n + JSON.stringify(r).length, 0);
    expect(recordChars).toBeGreaterThan(60_000);
    const data = await pushAll(records);
    const file = join(data, 'out.json');
    const r = await cli(['bundle-export', file, '--data', data]);
    expect(r.code, r.err).toBe(0);
    // Compact JSON, one record per line: the file is the records plus a few hundred characters.
    expect(statSync(file).size).toBeLessThan(recordChars + 2_000);
    const fresh = tempDataDir();
    const back = await cli(['bundle-import', file, '--data', fresh]);
    expect(back).toEqual({ code: 0, out: 'out.json: Read 1 site, 0 picks and 200 estimates: 201 new or newer, 0 already here or older.\n', err: '' });
  });

  it('a stored record beyond the bound (kept from before it existed) stops the export with a sentence naming it, and writes nothing', async () => {
    const data = await pushAll([site('old-site'), site('other-site')]);
    const db = new Database(join(data, DB_FILE_NAME));
    let deep: Record<string, unknown> = {};
    for (let i = 0; i < 100; i++) deep = { d: deep };
    const est: EstimateRecord = { type: 'estimate', id: 'old-deep', rev: 1, updatedAt: T, siteId: 'old-site', settings: {}, summary: deep, computedAt: T };
    db.prepare("INSERT INTO records (id, type, site_id, rev, rev_key, updated_at, seq, body) VALUES ('old-deep', 'estimate', 'old-site', 1, '1-x', ?, 99, ?)").run(T, JSON.stringify(est));
    db.close();
    const file = join(data, 'never.json');
    expect(await cli(['bundle-export', file, '--data', data])).toEqual({
      code: 1,
      out: '',
      err: `shearfield bundle-export: The estimate "old-deep" nests deeper than ${MAX_RECORD_DEPTH} levels of lists and objects, more than Shearfield keeps, so a bundle holding it could not be imported again; nothing was written. Export the other sites with --site, leaving out site "old-site".\n`,
    });
    expect(existsSync(file)).toBe(false);
    expect((await cli(['bundle-export', file, '--site', 'other-site', '--data', data])).code).toBe(0);
  });
});

describe('12. column hints are looked up in a plain map', () => {
  for (const header of ['__proto__', 'constructor', 'toString', 'hasOwnProperty']) {
    it(`a picks CSV with the column "${header}" gets the list of known columns, in the CLI as in the core`, async () => {
      const data = tempDataDir();
      const file = join(data, 'picks.csv');
      writeFileSync(file, `frequency_hz,velocity_m_s,${header}\n5,250,x\n`);
      const r = await cli(['estimate', file]);
      expect(r.code).toBe(1);
      expect(r.err).toMatch(new RegExp(`^shearfield estimate: .*Line 1: unknown column "${header}"\\. Known columns: frequency_hz, `));
      expect(r.err).not.toContain('[object');
      expect(() => parsePicksCsv(`frequency_hz,velocity_m_s,${header}\n5,250,x\n`)).toThrow(`Line 1: unknown column "${header}". Known columns: `);
    });
  }
});
