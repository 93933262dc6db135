/**
 * `shearfield estimate PICKS.csv`: the output contract, exact recovery
 * through the command line, and every bad-input path. The contract and the
 * file errors run as a user runs them (node bin/shearfield.mjs); the option
 * matrix runs the same dispatcher in-process (office/cli.ts main) to keep
 * the suite fast.
 *
 * Picks come from the core's closed-form forward model (core/dispersion/love-layer.ts;
 * Aki & Richards, *Quantitative Seismology*, 2nd ed. 2002, §7.2–7.3) for an
 * invented model (H = 12 m, β1 = 200 m/s, β2 = 500 m/s).
 */
import { spawnSync } from 'node:child_process';
import { mkdtempSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { CAUTION } from '../../../core/shared/caution';
import { picksToCsv, type Pick } from '../../../core/picks/picks';
import { main } from '../../../office/cli';
import { softSitePicks } from '../../fixtures';

const root = join(import.meta.dirname, '..', '..', '..');
let dir = '';

function spawnEstimate(...args: string[]) {
  const r = spawnSync(process.execPath, [join(root, 'bin', 'shearfield.mjs'), 'estimate', ...args], {
    cwd: root,
    encoding: 'utf8',
    timeout: 60_000,
  });
  return { code: r.status, out: r.stdout, err: r.stderr };
}

async function runEstimate(...args: string[]) {
  let out = '';
  let err = '';
  const code = await main(['estimate', ...args], { out: (t) => void (out += t), err: (t) => void (err += t) });
  return { code, out, err };
}

function file(name: string, content: string): string {
  const p = join(dir, name);
  writeFileSync(p, content);
  return p;
}

function exactPicks(count: number): Pick[] {
  return softSitePicks(count).map((p, i) => ({ ...p, id: `P${i + 1}` }));
}

let good = '';
beforeAll(() => {
  dir = mkdtempSync(join(tmpdir(), 'shearfield-estimate-'));
  good = file('good.csv', picksToCsv(exactPicks(20)));
});
afterAll(() => {
  rmSync(dir, { recursive: true, force: true });
});

const PARAM_KEYS = ['best', 'low68', 'high68', 'low95', 'high95'];

describe('shearfield estimate: the output contract', () => {
  it('prints the contract JSON, recovers the thickness of exact picks, and reports given speeds with equal bounds', () => {
    const r = spawnEstimate(good, '--vs1', '200', '--vs2', '500');
    expect(r.err).toBe('');
    expect(r.code).toBe(0);
    const json = JSON.parse(r.out);
    expect(Object.keys(json).slice(0, 7)).toEqual([
      'thickness_m',
      'vs1_m_s',
      'vs2_m_s',
      'alternatives',
      'misfit',
      'warnings',
      'caution',
    ]);
    for (const k of ['thickness_m', 'vs1_m_s', 'vs2_m_s']) expect(Object.keys(json[k])).toEqual(PARAM_KEYS);
    expect(Object.keys(json.misfit)).toEqual(['chi2', 'dof', 'detail']);
    // The statistics sit in misfit.detail; the warnings say it in plain words.
    expect(json.misfit.detail).toMatch(/^χ²\/dof = [0-9.e-]+ \(χ² = [0-9.e-]+ with 19 degrees of freedom; /);
    for (const w of json.warnings) expect(w).not.toMatch(/χ²|degrees of freedom/);
    expect(Math.abs(json.thickness_m.best - 12) / 12).toBeLessThan(1e-6);
    expect(json.thickness_m.low95).toBeLessThan(json.thickness_m.low68);
    expect(json.thickness_m.high95).toBeGreaterThan(json.thickness_m.high68);
    expect(json.vs1_m_s).toEqual({ best: 200, low68: 200, high68: 200, low95: 200, high95: 200 });
    expect(json.vs2_m_s).toEqual({ best: 500, low68: 500, high68: 500, low95: 500, high95: 500 });
    expect(json.misfit.dof).toBe(19);
    expect(json.alternatives).toHaveLength(1);
    expect(json.alternatives[0].rank).toBe(1);
    expect(Array.isArray(json.warnings) && json.warnings.every((w: unknown) => typeof w === 'string')).toBe(true);
    expect(json.caution).toBe(CAUTION);
    expect(json.vs30_m_s.best).toBeCloseTo(30 / (12 / 200 + 18 / 500), 4);
    expect(json.method).toMatch(/profile likelihood/);
  });

  it('estimates both speeds when they are not given, within user ranges, and names the picks in the fit table', async () => {
    const r = await runEstimate(good, '--vs1-range', '120:320', '--vs2-range', '300:900', '--thickness-range', '2:60');
    expect(r.code).toBe(0);
    const json = JSON.parse(r.out);
    expect(Math.abs(json.thickness_m.best - 12) / 12).toBeLessThan(1e-6);
    expect(Math.abs(json.vs1_m_s.best - 200) / 200).toBeLessThan(1e-6);
    expect(Math.abs(json.vs2_m_s.best - 500) / 500).toBeLessThan(1e-6);
    expect(json.search_range).toEqual({ thickness_m: [2, 60], vs1_m_s: [120, 320], vs2_m_s: [300, 900] });
    expect(json.misfit.dof).toBe(17);
    expect(json.picks[0].pick).toBe('row 1 (id "P1")');
    expect(typeof json.correlation_thickness_vs1).toBe('number');
  });

  it('says how many picks used the default sd', async () => {
    const noSd = file('nosd.csv', 'frequency_hz,velocity_m_s\n' + exactPicks(8).map((p) => `${p.frequency},${p.velocity}`).join('\n'));
    const r = await runEstimate(noSd, '--vs1', '200', '--vs2', '500');
    const json = JSON.parse(r.out);
    expect(json.defaulted_sd).toBe(8);
    expect(json.warnings.join('\n')).toMatch(/8 of 8 picks gave no sd_m_s; each uses 3 % of its velocity \(common practice/);
  });

  it('--help documents every option and its default', async () => {
    const r = await runEstimate('--help');
    expect(r.code).toBe(0);
    for (const flag of ['--vs1 V', '--vs2 V', '--density1 D', '--density2 D', '--vs1-range A:B', '--vs2-range A:B', '--thickness-range A:B']) {
      expect(r.out).toContain(flag);
    }
    expect(r.out).toMatch(/--density1 D\s+Layer density, kg\/m³\. Default 1800/);
    expect(r.out).toMatch(/--density2 D\s+Half-space density, kg\/m³\. Default 2100/);
    expect(r.out).toMatch(/Default 0\.5 × the slowest pick velocity to 1\.1 × the fastest/);
    expect(r.out).toMatch(/Default the slowest pick velocity to 4 × the fastest/);
    expect(r.out).toMatch(/Default 0\.02 × the shortest to 3 × the longest picked/);
    expect(r.out).toMatch(/3 % of its velocity \(common practice\)/);
  });

  it('--help names every key of the JSON it prints', async () => {
    const help = (await runEstimate('--help')).out;
    const json = JSON.parse((await runEstimate(good, '--vs1', '200', '--vs2', '500')).out);
    for (const key of Object.keys(json)) expect(help, key).toContain(`"${key}"`);
  });
});

describe('shearfield estimate: bad input exits non-zero with one line naming the row and column or the option', () => {
  it('a bad row in the file (spawned)', () => {
    const bad = file('bad.csv', 'frequency_hz,velocity_m_s\n5,300\n6,abc\n');
    const r = spawnEstimate(bad, '--vs1', '200', '--vs2', '500');
    expect(r.code).toBe(1);
    expect(r.out).toBe('');
    expect(r.err.trim().split('\n')).toHaveLength(1);
    expect(r.err).toMatch(/^shearfield estimate: Row 2 \(line 3\), column velocity_m_s: /);
  });

  it('a missing file (spawned)', () => {
    const r = spawnEstimate(join(dir, 'nope.csv'));
    expect(r.code).toBe(1);
    expect(r.err).toMatch(/^shearfield estimate: The picks file ".*nope\.csv" does not exist\.\n$/);
  });

  const fileCases: Array<[string, string, RegExp]> = [
    ['a velocity in km/s', 'frequency_hz,velocity_m_s\n5,0.3\n', /Row 1 \(line 2\), column velocity_m_s: .*km\/s/],
    ['an empty file', '', /The picks file is empty/],
    ['a missing header', '5,300\n6,280\n', /Line 1: the first row must be a header/],
    ['a negative frequency', 'frequency_hz,velocity_m_s\n-5,300\n', /Row 1 \(line 2\), column frequency_hz: must be greater than 0 Hz/],
    ['a duplicate frequency', 'frequency_hz,velocity_m_s\n5,300\n5,310\n', /Row 2 \(line 3\), column frequency_hz: repeats 5 Hz/],
  ];
  for (const [what, content, message] of fileCases) {
    it(what, async () => {
      const p = file(`case-${what.replace(/\W+/g, '-')}.csv`, content);
      const r = await runEstimate(p, '--vs1', '200', '--vs2', '500');
      expect(r.code).toBe(1);
      expect(r.out).toBe('');
      expect(r.err.trim().split('\n')).toHaveLength(1);
      expect(r.err).toMatch(message);
    });
  }

  const optionCases: Array<[string, string[], RegExp]> = [
    ['--vs1 not a number', ['--vs1', 'abc'], /--vs1 must be a number in m\/s, but it is "abc"\./],
    ['--vs2 empty', ['--vs2', ''], /--vs2 must be a number in m\/s, but it is ""\./],
    ['--vs1 in km/s', ['--vs1', '0.2'], /--vs1 is 0\.2 m\/s, below the 30 m\/s lower bound for shear speed\. It looks like km\/s/],
    ['--vs2 slower than --vs1', ['--vs1', '200', '--vs2', '150'], /--vs2 is 150 m\/s, but it must be faster than --vs1 \(200 m\/s\)/],
    ['--density1 in g/cm³', ['--density1', '1.8'], /--density1 is 1\.8 kg\/m³, below the 1000 kg\/m³ lower bound for density\. It looks like g\/cm³/],
    ['--density2 not a number', ['--density2', '2,1'], /--density2 must be a number in kg\/m³, but it is "2,1"\./],
    ['--vs1-range one number', ['--vs1-range', '100'], /--vs1-range must be two numbers in m\/s written LOW:HIGH \(e\.g\. 100:400\), but it is "100"\./],
    ['--vs2-range reversed', ['--vs2-range', '900:300'], /--vs2-range must have its low end below its high end, but it is 900 to 300\./],
    ['--vs2-range above the bound', ['--vs2-range', '300:9000'], /--vs2-range \(high end\) is 9000 m\/s, above the 5000 m\/s upper bound/],
    ['--thickness-range zero', ['--thickness-range', '0:20'], /--thickness-range \(low end\) must be greater than 0 m, but it is 0\./],
    ['--thickness-range text', ['--thickness-range', 'a:b'], /--thickness-range must be two numbers in m written LOW:HIGH/],
    ['--vs1 with --vs1-range', ['--vs1', '200', '--vs1-range', '100:300'], /--vs1-range applies only when --vs1 is not given/],
    ['--vs2 with --vs2-range', ['--vs2', '500', '--vs2-range', '300:900'], /--vs2-range applies only when --vs2 is not given/],
    [
      '--vs2-range below a given --vs1',
      ['--vs1', '400', '--vs2-range', '100:300'],
      /The half-space speed range 100–300 m\/s leaves nothing faster than the layer speed 400 m\/s.*Raise --vs2-range or lower --vs1\./,
    ],
  ];
  for (const [what, args, message] of optionCases) {
    it(what, async () => {
      const r = await runEstimate(good, ...args);
      expect(r.code).toBe(1);
      expect(r.out).toBe('');
      expect(r.err.trim().split('\n')).toHaveLength(1);
      expect(r.err).toMatch(message);
    });
  }

  it('too few picks for the free parameters', async () => {
    const two = file('two.csv', 'frequency_hz,velocity_m_s\n5,300\n8,250\n');
    const r = await runEstimate(two);
    expect(r.code).toBe(1);
    expect(r.err).toMatch(/There are 2 picks, too few for 3 free parameters \(thickness, vs1, vs2\); give at least 3 picks or fix a speed\./);
  });

  it('usage errors exit 2: no file, two files, an unknown option', async () => {
    const none = await runEstimate('--vs1', '200');
    expect(none.code).toBe(2);
    expect(none.err).toMatch(/give exactly one picks file \(PICKS\.csv\), but none was given/);
    const two = await runEstimate(good, good);
    expect(two.code).toBe(2);
    expect(two.err).toMatch(/but 2 were given/);
    const unknown = await runEstimate(good, '--depth', '3');
    expect(unknown.code).toBe(2);
    expect(unknown.err).toMatch(/^shearfield estimate: Unknown option '--depth'/);
  });
});
