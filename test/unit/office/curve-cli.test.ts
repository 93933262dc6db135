/**
 * `shearfield curve MODEL.json`: the output contract (issue 2 §3) and every
 * bad-input path, run as a user runs them (node bin/shearfield.mjs, spawned
 * concurrently to keep the suite fast). Expected velocities come from the
 * one-layer closed forms (core/dispersion/love-layer.ts; Aki & Richards, *Quantitative
 * Seismology*, 2nd ed. 2002, §7.2–7.3) for an invented model; the cutoff of
 * mode 1 is the closed form f_1 = β1β2 / (2H√(β2² − β1²)).
 */
import { mkdirSync, mkdtempSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { spawnShearfield, type CliRun } from './cli-process';
import { logBand } from '../../../core/dispersion/curve';
import { loveCutoffHz, loveVelocities } from '../../../core/dispersion/love-layer';

let dir = '';

type Run = CliRun;

const run = (...args: string[]): Promise<Run> => spawnShearfield(['curve', ...args], dir);

const MODEL = '{"layers":[{"thickness_m":10,"vs_m_s":200,"density_kg_m3":1800}],"halfspace":{"vs_m_s":500,"density_kg_m3":2000}}';
const P = { h: 10, vs1: 200, vs2: 500, rho1: 1800, rho2: 2000 };

const results = new Map<string, Run>();
const scenarios: Record<string, string[]> = {
  json: ['model.json', '--freq', '20,1,5.5', '--modes', '3'],
  band: ['model.json', '--band', '1:50:200', '--modes', '2'],
  csv: ['model.json', '--band', '2:40:5', '--modes', '2', '--csv'],
  layered: ['layered.json', '--freq', '3,30'],
  help: ['--help'],
  missing: ['nowhere.json', '--freq', '1'],
  folder: ['adir', '--freq', '1'],
  badJson: ['broken.json', '--freq', '1'],
  notObject: ['list.json', '--freq', '1'],
  kmPerS: ['km.json', '--freq', '1'],
  notTrapped: ['fast-layer.json', '--freq', '1'],
  noFile: ['--freq', '1'],
  twoFiles: ['model.json', 'model.json', '--freq', '1'],
  neither: ['model.json'],
  both: ['model.json', '--freq', '1', '--band', '1:2:3'],
  freqText: ['model.json', '--freq', '1,abc'],
  freqZero: ['model.json', '--freq', '0'],
  freqEmpty: ['model.json', '--freq', '1,,2'],
  bandShape: ['model.json', '--band', '1:50'],
  bandOrder: ['model.json', '--band', '50:1:10'],
  bandCount: ['model.json', '--band', '1:50:1.5'],
  bandFrom: ['model.json', '--band', 'x:50:10'],
  modesZero: ['model.json', '--freq', '1', '--modes', '0'],
  modesText: ['model.json', '--freq', '1', '--modes', 'two'],
  unknownOption: ['model.json', '--freq', '1', '--colour'],
  valueMissing: ['model.json', '--freq'],
  valueDash: ['model.json', '--freq', '-1'],
  switchValue: ['model.json', '--freq', '1', '--csv=yes'],
  rayleigh: ['with-vp.json', '--freq', '4000,2000', '--modes', '2', '--wave', 'rayleigh'],
  rayleighCsv: ['with-vp.json', '--band', '1:10:3', '--wave', 'RAYLEIGH', '--csv'],
  loveIgnoresVp: ['with-vp.json', '--freq', '5'],
  branchesMeet: ['stiff-crust.json', '--band', '5:40:100', '--modes', '2', '--wave', 'rayleigh'],
  branchesApart: ['with-vp.json', '--band', '1:60:100', '--modes', '3', '--wave', 'rayleigh'],
  waveBad: ['model.json', '--freq', '1', '--wave', 'shear'],
  vpMissing: ['model.json', '--freq', '1', '--wave', 'rayleigh'],
  vpLow: ['low-vp.json', '--freq', '1', '--wave', 'rayleigh'],
  negativePoisson: ['negative-poisson.json', '--freq', '5', '--wave', 'rayleigh'],
};

/**
 * Invented model with P speeds, Poisson's ratio 1/4 (vp = √3·vs) in both: at high frequency (k·H ≈ 300 and more)
 * the fundamental Rayleigh mode travels at the top layer's Rayleigh speed √(2 − 2/√3)·β1 (closed-form limit,
 * exponentially close), and so does its group velocity.
 */
const WITH_VP = {
  layers: [{ thickness_m: 8, vs_m_s: 200, density_kg_m3: 1800, vp_m_s: 200 * Math.sqrt(3) }],
  halfspace: { vs_m_s: 400, density_kg_m3: 2000, vp_m_s: 400 * Math.sqrt(3) },
};
const TOP_RAYLEIGH = Math.sqrt(2 - 2 / Math.sqrt(3)) * 200;
/** Invented: a stiff crust over a soft layer, where the fundamental passes from one branch to another near 18.6 Hz. */
const STIFF_CRUST = {
  layers: [
    { thickness_m: 4, vs_m_s: 400, vp_m_s: 720, density_kg_m3: 2000 },
    { thickness_m: 4, vs_m_s: 130, vp_m_s: 330, density_kg_m3: 1750 },
    { thickness_m: 17, vs_m_s: 270, vp_m_s: 540, density_kg_m3: 1900 },
  ],
  halfspace: { vs_m_s: 430, vp_m_s: 860, density_kg_m3: 2100 },
};

beforeAll(async () => {
  dir = mkdtempSync(join(tmpdir(), 'shearfield-curve-'));
  writeFileSync(join(dir, 'model.json'), MODEL);
  writeFileSync(
    join(dir, 'layered.json'),
    JSON.stringify({
      layers: [
        { thickness_m: 4, vs_m_s: 200, density_kg_m3: 1800 },
        { thickness_m: 6, vs_m_s: 200, density_kg_m3: 1800 },
      ],
      halfspace: { vs_m_s: 500, density_kg_m3: 2000 },
    }),
  );
  writeFileSync(join(dir, 'with-vp.json'), JSON.stringify(WITH_VP));
  writeFileSync(join(dir, 'stiff-crust.json'), JSON.stringify(STIFF_CRUST));
  writeFileSync(join(dir, 'low-vp.json'), JSON.stringify({ ...WITH_VP, layers: [{ ...WITH_VP.layers[0], vp_m_s: 230 }] }));
  writeFileSync(join(dir, 'negative-poisson.json'), JSON.stringify({ ...WITH_VP, layers: [{ ...WITH_VP.layers[0], vp_m_s: 260 }] }));
  writeFileSync(join(dir, 'broken.json'), '{"layers": [');
  writeFileSync(join(dir, 'list.json'), '[1, 2, 3]');
  writeFileSync(join(dir, 'km.json'), MODEL.replace('"vs_m_s":200', '"vs_m_s":0.2'));
  writeFileSync(join(dir, 'fast-layer.json'), MODEL.replace('"vs_m_s":500', '"vs_m_s":150'));
  mkdirSync(join(dir, 'adir'));
  const entries = Object.entries(scenarios);
  const runs = await Promise.all(entries.map(([, args]) => run(...args)));
  entries.forEach(([name], i) => results.set(name, runs[i]));
}, 120_000);

afterAll(() => {
  if (dir) rmSync(dir, { recursive: true, force: true });
});

function get(name: string): Run {
  const r = results.get(name);
  if (!r) throw new Error(`no run ${name}`);
  return r;
}

describe('shearfield curve: output contract', () => {
  it('prints exactly {"wave":"love","modes":[{"mode":n,"points":[…]}]} with the four fields, ascending frequency', () => {
    const r = get('json');
    expect(r.err).toBe('');
    expect(r.code).toBe(0);
    const j = JSON.parse(r.out);
    expect(Object.keys(j)).toEqual(['wave', 'modes']);
    expect(j.wave).toBe('love');
    expect(j.modes.map((m: { mode: number }) => m.mode)).toEqual([0, 1, 2]);
    for (const m of j.modes) {
      expect(Object.keys(m)).toEqual(['mode', 'points']);
      for (const p of m.points) {
        expect(Object.keys(p)).toEqual(['frequency_hz', 'period_s', 'phase_velocity_m_s', 'group_velocity_m_s']);
        expect(p.period_s).toBe(1 / p.frequency_hz);
        const v = loveVelocities(P, p.frequency_hz, m.mode);
        expect(Math.abs(p.phase_velocity_m_s / v.phase - 1)).toBeLessThan(1e-12);
        expect(Math.abs(p.group_velocity_m_s / v.group - 1)).toBeLessThan(1e-12);
      }
    }
    expect(j.modes[0].points.map((p: { frequency_hz: number }) => p.frequency_hz)).toEqual([1, 5.5, 20]);
    // f1 ≈ 10.9 Hz and f2 ≈ 21.8 Hz (closed form): mode 1 only at 20 Hz, mode 2 nowhere.
    expect(loveCutoffHz(P, 1)).toBeGreaterThan(5.5);
    expect(loveCutoffHz(P, 2)).toBeGreaterThan(20);
    expect(j.modes[1].points.map((p: { frequency_hz: number }) => p.frequency_hz)).toEqual([20]);
    expect(j.modes[2].points).toEqual([]);
  });

  it('--band FROM:TO:COUNT samples COUNT log-spaced frequencies, each mode only above its cutoff', () => {
    const j = JSON.parse(get('band').out);
    const band = Array.from(logBand(1, 50, 200));
    expect(j.modes[0].points.map((p: { frequency_hz: number }) => p.frequency_hz)).toEqual(band);
    const f1 = loveCutoffHz(P, 1);
    expect(j.modes[1].points.map((p: { frequency_hz: number }) => p.frequency_hz)).toEqual(band.filter((f) => f > f1));
  });

  it('--csv prints a table with a mode column and the same column names', () => {
    const r = get('csv');
    expect(r.code).toBe(0);
    const lines = r.out.trimEnd().split('\n');
    expect(lines[0]).toBe('mode,frequency_hz,period_s,phase_velocity_m_s,group_velocity_m_s');
    const rows = lines.slice(1).map((l) => l.split(',').map(Number));
    const band = Array.from(logBand(2, 40, 5));
    const f1 = loveCutoffHz(P, 1);
    expect(rows.length).toBe(band.length + band.filter((f) => f > f1).length);
    for (const [mode, f, t, c, u] of rows) {
      expect(t).toBe(1 / f);
      const v = loveVelocities(P, f, mode);
      expect(Math.abs(c / v.phase - 1)).toBeLessThan(1e-12);
      expect(Math.abs(u / v.group - 1)).toBeLessThan(1e-12);
    }
  });

  it('gives the same numbers for a split layer (N-layer propagator)', () => {
    const j = JSON.parse(get('layered').out);
    for (const p of j.modes[0].points) {
      const v = loveVelocities(P, p.frequency_hz, 0);
      expect(Math.abs(p.phase_velocity_m_s / v.phase - 1)).toBeLessThan(1e-9);
      expect(Math.abs(p.group_velocity_m_s / v.group - 1)).toBeLessThan(1e-9);
    }
  });

  it('--help documents every option', () => {
    const r = get('help');
    expect(r.code).toBe(0);
    for (const word of ['MODEL.json', '--freq', '--band', '--modes', '--wave', 'rayleigh', 'vp_m_s', '√(4/3)', '--csv', '--help', 'Default: 1', 'Default: love', 'frequency_hz']) {
      expect(r.out).toContain(word);
    }
  });
});

describe('shearfield curve --wave rayleigh', () => {
  it('prints the same JSON shape with "wave":"rayleigh"; at high frequency the top layer’s Rayleigh speed √(2 − 2/√3)·β1', () => {
    const r = get('rayleigh');
    expect(r.err).toBe('');
    expect(r.code).toBe(0);
    const j = JSON.parse(r.out);
    expect(Object.keys(j)).toEqual(['wave', 'modes']);
    expect(j.wave).toBe('rayleigh');
    expect(j.modes.map((m: { mode: number }) => m.mode)).toEqual([0, 1]);
    expect(j.modes[0].points.map((p: { frequency_hz: number }) => p.frequency_hz)).toEqual([2000, 4000]);
    for (const p of j.modes[0].points) {
      expect(Object.keys(p)).toEqual(['frequency_hz', 'period_s', 'phase_velocity_m_s', 'group_velocity_m_s']);
      expect(Math.abs(p.phase_velocity_m_s / TOP_RAYLEIGH - 1)).toBeLessThan(1e-10);
      expect(Math.abs(p.group_velocity_m_s / TOP_RAYLEIGH - 1)).toBeLessThan(1e-8);
    }
    // Mode 1 lies above the fundamental (between β1 and β_H).
    for (const p of j.modes[1].points) expect(p.phase_velocity_m_s).toBeGreaterThan(TOP_RAYLEIGH);
  });

  it('takes the wave name in any case and prints the CSV table', () => {
    const r = get('rayleighCsv');
    expect(r.code).toBe(0);
    const lines = r.out.trimEnd().split('\n');
    expect(lines[0]).toBe('mode,frequency_hz,period_s,phase_velocity_m_s,group_velocity_m_s');
    expect(lines.length).toBe(4);
  });

  it('ignores P speeds for Love waves (the default)', () => {
    const j = JSON.parse(get('loveIgnoresVp').out);
    expect(j.wave).toBe('love');
    const v = loveVelocities({ h: 8, vs1: 200, vs2: 400, rho1: 1800, rho2: 2000 }, 5, 0);
    expect(Math.abs(j.modes[0].points[0].phase_velocity_m_s / v.phase - 1)).toBeLessThan(1e-12);
  });

  it('notes where two branches come close (a stiff crust over a soft layer), and stays silent for a plain soft layer over stiffer ground', () => {
    const meet = get('branchesMeet');
    expect(meet.code).toBe(0);
    const notes = meet.err.split('\n').filter((l) => l.includes('note:'));
    expect(notes.length, meet.err).toBeGreaterThan(0);
    const m = /^shearfield curve: note: modes 0 and 1 come within ([\d.e+-]+) m\/s of each other near ([\d.]+) Hz; their branches osculate or cross there, and modes are numbered by order of phase velocity\.$/.exec(notes[0]);
    expect(m, notes[0]).not.toBeNull();
    // Within 1 % of the phase velocity there (APPROACH_RTOL), near 18.6 Hz.
    expect(Number(m?.[1])).toBeLessThan(3);
    expect(Math.abs(Number(m?.[2]) - 18.6)).toBeLessThan(1);
    const apart = get('branchesApart');
    expect(apart.code).toBe(0);
    expect(apart.err).toBe('');
    expect(JSON.parse(apart.out).modes.length).toBe(3);
  });

  it('warns on stderr, and still answers, for a Poisson ratio below 0', () => {
    const r = get('negativePoisson');
    expect(r.code).toBe(0);
    expect(JSON.parse(r.out).wave).toBe('rayleigh');
    expect(r.err).toBe(
      "shearfield curve: warning: layers[0]: vp_m_s / vs_m_s = 1.300 gives a Poisson's ratio of -0.225, below 0, which is rare in soils and rocks; check the P speed.\n",
    );
  });
});

describe('shearfield curve: bad input exits non-zero with one line naming the field', () => {
  const expectations: [string, number, RegExp][] = [
    ['missing', 1, /^shearfield curve: The model file "nowhere\.json" does not exist\.\n$/],
    ['folder', 1, /^shearfield curve: The model file "adir" is a folder, not a file\.\n$/],
    ['badJson', 1, /^shearfield curve: The model file "broken\.json" is not valid JSON \(.+\)\.\n$/],
    ['notObject', 1, /^shearfield curve: The model file "list\.json" is invalid: The model file must hold a JSON object with "layers" and "halfspace"\.\n$/],
    ['kmPerS', 1, /^shearfield curve: The model file "km\.json" is invalid: layers\[0\]\.vs_m_s is 0\.2 m\/s, below the 30 m\/s lower bound for shear speed\. It looks like km\/s; enter the speed in m\/s\.\n$/],
    ['notTrapped', 1, /^shearfield curve: The model file "fast-layer\.json" is invalid: halfspace\.vs_m_s is 150 m\/s, but it must be faster than the slowest layer \(200 m\/s\) for Love waves to be trapped\.\n$/],
    ['noFile', 1, /^shearfield curve: Give one model file, e\.g\. shearfield curve model\.json --band 1:50:200\.\n$/],
    ['twoFiles', 1, /^shearfield curve: Give exactly one model file, but 2 were given\.\n$/],
    ['neither', 1, /^shearfield curve: Give either --freq LIST or --band FROM:TO:COUNT \(exactly one of them\)\.\n$/],
    ['both', 1, /^shearfield curve: Give either --freq LIST or --band FROM:TO:COUNT \(exactly one of them\)\.\n$/],
    ['freqText', 1, /^shearfield curve: --freq value 2 must be a number, but it is "abc"\.\n$/],
    ['freqZero', 1, /^shearfield curve: --freq value 1 must be a frequency above 0 Hz, but it is 0\.\n$/],
    ['freqEmpty', 1, /^shearfield curve: --freq value 2 must be a number, but it is ""\.\n$/],
    ['bandShape', 1, /^shearfield curve: --band must be FROM:TO:COUNT \(e\.g\. 1:50:200\), but it is "1:50"\.\n$/],
    ['bandOrder', 1, /^shearfield curve: --band TO \(1 Hz\) must be above FROM \(50 Hz\)\.\n$/],
    ['bandCount', 1, /^shearfield curve: --band COUNT must be a whole number from 2 to 100000, but it is "1\.5"\.\n$/],
    ['bandFrom', 1, /^shearfield curve: --band FROM must be a number, but it is "x"\.\n$/],
    ['modesZero', 1, /^shearfield curve: --modes must be a whole number from 1 to 100, but it is "0"\.\n$/],
    ['modesText', 1, /^shearfield curve: --modes must be a whole number from 1 to 100, but it is "two"\.\n$/],
    ['unknownOption', 2, /^shearfield curve: Unknown option '--colour'\. See shearfield curve --help for the options\.\n$/],
    ['valueMissing', 2, /^shearfield curve: --freq needs a value, but none was given\.\n$/],
    ['valueDash', 2, /^shearfield curve: --freq needs a value, but the next word starts with "-"; to give a value that starts with "-", write --freq=VALUE\.\n$/],
    ['switchValue', 2, /^shearfield curve: --csv is a switch and takes no value; give it alone\.\n$/],
    ['waveBad', 1, /^shearfield curve: --wave must be love or rayleigh, but it is "shear"\.\n$/],
    ['vpMissing', 1, /^shearfield curve: The model file "model\.json" is invalid: layers\[0\]\.vp_m_s is missing; Rayleigh waves need the P-wave speed of every layer and of the half-space\.\n$/],
    ['vpLow', 1, /^shearfield curve: The model file "low-vp\.json" is invalid: layers\[0\]\.vp_m_s is 230 m\/s, but it must be more than √\(4\/3\) ≈ 1\.155 times layers\[0\]\.vs_m_s \(200 m\/s\), since no stable elastic solid has a lower P\/S speed ratio\.\n$/],
  ];
  for (const [name, code, message] of expectations) {
    it(`${name}: exit ${code}, ${message.source.slice(19, 80)}…`, () => {
      const r = get(name);
      expect(r.code).toBe(code);
      expect(r.out).toBe('');
      expect(r.err).toMatch(message);
      expect(r.err.trimEnd().split('\n').length).toBe(1);
    });
  }
});
