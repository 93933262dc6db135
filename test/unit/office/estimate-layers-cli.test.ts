/**
 * `shearfield estimate PICKS.csv --layers N`: the layered output contract
 * (the "profile" object of issue 13), --layers 1 keeping the one-layer
 * output exactly, --help naming every key, and the bad-input paths. Runs
 * the dispatcher in-process (office/cli.ts main) to keep the suite fast.
 *
 * Picks: the forward step of core/profile for an invented two-layer site
 * (test/fixtures.ts), exact.
 */
import { mkdtempSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, beforeAll, describe, expect, it, vi } from 'vitest';
import { CAUTION } from '../../../core/shared/caution';
import { picksToCsv } from '../../../core/picks/picks';
import { main } from '../../../office/cli';
import { vpFromPoisson } from '../../../core/profile/p-speed';
import { INVENTED_TWO_LAYER_SITE, layeredPicks, softSitePicks } from '../../fixtures';

// Whole estimates (search, refinement, ensemble) run here: generous time on a busy 2-core machine; speed is measured by the bench, not here.
vi.setConfig({ testTimeout: 180_000 });

let dir = '';
let good = '';
let oneLayer = '';
let rayleigh = '';
let pSpeeds = '';

async function run(...args: string[]) {
  let out = '';
  let err = '';
  const code = await main(['estimate', ...args], { out: (t) => void (out += t), err: (t) => void (err += t) });
  return { code, out, err };
}

beforeAll(() => {
  dir = mkdtempSync(join(tmpdir(), 'shearfield-layers-'));
  good = join(dir, 'two.csv');
  writeFileSync(good, picksToCsv(layeredPicks(INVENTED_TWO_LAYER_SITE, 'love', 24, 3, 50)));
  rayleigh = join(dir, 'rayleigh.csv');
  const vp = [...INVENTED_TWO_LAYER_SITE.layers.map((l) => vpFromPoisson(l.vs, 0.3)), vpFromPoisson(INVENTED_TWO_LAYER_SITE.halfspace.vs, 0.3)];
  writeFileSync(rayleigh, picksToCsv(layeredPicks(INVENTED_TWO_LAYER_SITE, 'rayleigh', 10, 4, 40, undefined, vp)));
  pSpeeds = join(dir, 'p-speeds.json');
  writeFileSync(pSpeeds, JSON.stringify({ layers: [{ vp_m_s: 400, density_kg_m3: 1800 }], halfspace: { vp_m_s: 1300, density_kg_m3: 2100 } }));
  oneLayer = join(dir, 'one.csv');
  writeFileSync(oneLayer, picksToCsv(softSitePicks(20)));
});
afterAll(() => rmSync(dir, { recursive: true, force: true }));

describe('shearfield estimate --layers N', () => {
  it('prints the profile object first, with the band, verdict, model choice, Vs30 and classes, and the caution', async () => {
    const r = await run(good, '--layers', '2', '--seed', '7');
    expect(r.err).toBe('');
    expect(r.code).toBe(0);
    const j = JSON.parse(r.out);
    expect(Object.keys(j).slice(0, 2)).toEqual(['profile', 'verdict']);
    expect(Object.keys(j.profile)).toEqual(['layers', 'halfspace', 'depth_m', 'vs_band_m_s']);
    expect(j.profile.layers).toHaveLength(2);
    expect(Math.abs(j.profile.layers[0].thickness_m.best - 5) / 5).toBeLessThan(1e-3);
    expect(Math.abs(j.profile.halfspace.vs_m_s.best - 600) / 600).toBeLessThan(1e-3);
    expect(j.model_choice.tried.map((c: { layers: number }) => c.layers)).toEqual([1, 2]);
    expect(j.model_choice.criterion).toMatch(/Schwarz 1978/);
    expect(j.vs30_m_s.low95).toBeLessThanOrEqual(j.vs30_m_s.best);
    expect(Object.keys(j.site_class)).toEqual(['asce7_16', 'asce7_22', 'en1998_1']);
    expect(j.caution).toBe(CAUTION);
    expect(j.ensemble.seed).toBe(7);
  });

  it('--layers 1 with Love picks keeps the one-layer output exactly', async () => {
    const plain = await run(oneLayer);
    const one = await run(oneLayer, '--layers', '1');
    expect(one.code).toBe(0);
    expect(one.out).toBe(plain.out);
    expect(Object.keys(JSON.parse(one.out))[0]).toBe('thickness_m');
  });

  it('takes Rayleigh picks (the wave column) with a Poisson ratio, or fixed P speeds from a model file', async () => {
    const r = await run(rayleigh, '--poisson', '0.3', '--seed', '2');
    expect(r.err).toBe('');
    const j = JSON.parse(r.out);
    expect(j.layers).toBe(1);
    expect(j.waves).toEqual({ love: 0, rayleigh: 10 });
    expect(j.p_speed).toMatchObject({ rule: 'poisson', poisson: 0.3, poisson_defaulted: false, used: true });
    const fixed = JSON.parse((await run(rayleigh, '--p-speeds', pSpeeds, '--seed', '2')).out);
    expect(fixed.p_speed).toMatchObject({ rule: 'fixed', layers_vp_m_s: [400], halfspace_vp_m_s: 1300 });
    expect(fixed.density_kg_m3).toEqual({ layers: [1800], halfspace: 2100 });
  });

  it('--help documents the layered options and names every key of the layered JSON', async () => {
    const help = (await run('--help')).out;
    for (const flag of ['--layers N|auto', '--poisson NU', '--water-table-m D', '--p-speeds MODEL.json', '--seed S']) expect(help).toContain(flag);
    expect(help).toMatch(/Default 0\.3 \(common practice for unsaturated soil/);
    const j = JSON.parse((await run(good, '--layers', '2')).out);
    for (const key of Object.keys(j)) expect(help, key).toContain(`"${key}"`);
  });
});

describe('shearfield estimate --layers: bad input exits 1 with one sentence naming the option', () => {
  const cases: Array<[string, string[], string]> = [
    ['five layers', ['--layers', '5'], '--layers must be a whole number from 1 to 4 or "auto", but it is "5".'],
    ['a word for the layers', ['--layers', 'many'], '--layers must be a whole number from 1 to 4 or "auto", but it is "many".'],
    ['a P-speed option with Love picks only', ['--layers', '2', '--poisson', '0.3'], '--poisson sets P speeds for Rayleigh picks, but every pick in the file is a Love pick (Love waves do not depend on P speed).'],
    ['a one-layer option with --layers 2', ['--layers', '2', '--vs1', '200'], '--vs1 applies only to the one-layer Love estimate, not to the layered estimate (--layers or Rayleigh picks).'],
    ['a P-speed model file with too few layers', ['--layers', '2', '--p-speeds', 'P'], '--p-speeds lists 1 layer P speeds, but the estimate uses up to 2 layers.'],
    ['a seed for the one-layer estimate', ['--seed', '3'], '--seed applies only to the layered estimate (--layers 2–4 or auto, or Rayleigh picks); the one-layer estimate has no randomness.'],
  ];
  for (const [what, args, message] of cases) {
    it(what, async () => {
      const file = args.includes('--p-speeds') ? rayleigh : good;
      const r = await run(file, ...args.map((a) => (a === 'P' ? pSpeeds : a)));
      expect(r.code).toBe(1);
      expect(r.out).toBe('');
      expect(r.err).toBe(`shearfield estimate: ${message}\n`);
    });
  }
});

describe('shearfield site on a layered estimate', () => {
  async function site(...args: string[]) {
    let out = '';
    let err = '';
    const code = await main(['site', ...args], { out: (t) => void (out += t), err: (t) => void (err += t) });
    return { code, out, err };
  }

  it('gives the figures of the best layered model, the classes and Vs30 range over the ensemble, and the verdict', async () => {
    const est = await run(good, '--layers', '2', '--seed', '4');
    const path = join(dir, 'profile.json');
    writeFileSync(path, est.out);
    const j = JSON.parse(est.out);
    const r = await site(path);
    expect(r.err).toBe('');
    const s = JSON.parse(r.out);
    // Vs30 of the best model: EN 1998-1 eq. 3.1, 30 / Σ h/β with the half-space below the layers.
    const [l1, l2] = j.profile.layers;
    const hs = j.profile.halfspace.vs_m_s.best;
    const rest = 30 - l1.thickness_m.best - l2.thickness_m.best;
    expect(s.vs30_m_s).toBeCloseTo(30 / (l1.thickness_m.best / l1.vs_m_s.best + l2.thickness_m.best / l2.vs_m_s.best + rest / hs), 9);
    expect(s.site_class.en1998_1).toEqual(j.site_class.en1998_1.classes);
    expect(s.ranges.vs30_m_s).toEqual([j.vs30_m_s.low95, j.vs30_m_s.high95]);
    expect(s.verdict).toEqual(j.verdict);
    expect(s.caution).toBe(CAUTION);
  });

  it('refuses a layered estimate with a bad number, naming the field', async () => {
    const path = join(dir, 'bad-profile.json');
    writeFileSync(path, JSON.stringify({ profile: { layers: [{ thickness_m: { best: 'x' } }] } }));
    const r = await site(path);
    expect(r.code).toBe(1);
    expect(r.err).toBe(`shearfield site: The estimate file "${path}" is invalid: profile.layers[0].thickness_m.best must be a number, but it is "x".\n`);
  });
});
