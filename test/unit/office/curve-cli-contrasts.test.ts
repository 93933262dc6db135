/**
 * `shearfield curve` on a model the engine cannot fully solve (issue 9 §1):
 * 100 × [10 m, 5000 m/s, 3500 kg/m³ + 10 m, 100 m/s, 1000 kg/m³] over
 * 5000 m/s, 3500 kg/m³. It must finish, print what it solved, and say in
 * one sentence what it left out; with nothing solved, one error sentence
 * and exit 1. Mode 0 at 2 Hz, 4335.628 m/s, is the thin-layer check of
 * test/reference/love-strong-contrasts.test.ts (Lysmer 1970; Kausel &
 * Roësset 1981). Kept apart from curve-cli.test.ts so each file's runs
 * stay few.
 */
import { mkdtempSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { spawnShearfield, type CliRun } from './cli-process';

let dir = '';

type Run = CliRun;

const run = (...args: string[]): Promise<Run> => spawnShearfield(['curve', ...args], dir);

const results = new Map<string, Run>();
function get(name: string): Run {
  const r = results.get(name);
  if (!r) throw new Error(`no run ${name}`);
  return r;
}

beforeAll(async () => {
  dir = mkdtempSync(join(tmpdir(), 'shearfield-curve-contrasts-'));
  const pair = [
    { thickness_m: 10, vs_m_s: 5000, density_kg_m3: 3500 },
    { thickness_m: 10, vs_m_s: 100, density_kg_m3: 1000 },
  ];
  writeFileSync(join(dir, 'pairs.json'), JSON.stringify({ layers: Array.from({ length: 100 }, () => pair).flat(), halfspace: { vs_m_s: 5000, density_kg_m3: 3500 } }));
  const [a, b] = await Promise.all([run('pairs.json', '--freq', '0.5,2,10,50', '--modes', '3'), run('pairs.json', '--freq', '50')]);
  results.set('contrasts', a);
  results.set('contrastsOnly50', b);
}, 120_000);

afterAll(() => {
  if (dir) rmSync(dir, { recursive: true, force: true });
});

describe('shearfield curve: a 200-layer stack of strong contrasts', () => {
  it('finishes a 200-layer stack of strong contrasts, printing what it solved and one warning sentence for the rest', () => {
    const r = get('contrasts');
    expect(r.code).toBe(0);
    // Mode 0 at 2 Hz: 4335.628 m/s per the thin-layer check in test/reference/love-strong-contrasts.test.ts.
    const j = JSON.parse(r.out);
    expect(j.modes[0].points.map((p: { frequency_hz: number }) => p.frequency_hz)).toEqual([0.5, 2, 10]);
    expect(Math.abs(j.modes[0].points[1].phase_velocity_m_s - 4335.628)).toBeLessThan(5e-4);
    expect(r.err).toBe(
      'shearfield curve: warning: 3 points left out (modes 0, 1, 2 at 50 Hz): modes there lie closer together than double precision can tell apart (near-identical wave guides, e.g. many equal soft layers between stiff ones).\n',
    );
  });

  it('answers a curve of which no point can be computed with one error sentence and exit 1', () => {
    const r = get('contrastsOnly50');
    expect(r.code).toBe(1);
    expect(r.out).toBe('');
    expect(r.err).toMatch(/^shearfield curve: No point of the curve could be computed for this model: 1 point left out \(mode 0 at 50 Hz\): modes there lie closer/);
    expect(r.err.split('\n').length).toBe(2);
  });

});
