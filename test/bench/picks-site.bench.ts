/**
 * Picks file and site-figure benchmarks. No target in issue 3; the figures
 * show that reading a field file and the site figures cost nothing next to
 * the estimate. Picks are invented (a soft-soil site), not measured data.
 */
import { parsePicksCsv, picksToCsv } from '../../core/picks/picks';
import { siteFigures, siteFiguresForRanges } from '../../core/site/site';
import { bench, type BenchResult } from './harness';

function invented(n: number): string {
  const rows = ['frequency_hz,velocity_m_s,sd_m_s,kind,mode,note'];
  for (let i = 0; i < n; i++) {
    const f = 2 + (48 * i) / n;
    rows.push(`${f},${(180 + 400 / f).toFixed(2)},${i % 3 === 0 ? '' : '6'},group,0,"invented, row ${i}"`);
  }
  return rows.join('\r\n') + '\r\n';
}

export default async function (): Promise<BenchResult[]> {
  const small = invented(30);
  const large = invented(100_000);
  const picks = parsePicksCsv(small).picks;
  const model = {
    layers: [
      { thickness: 5, vs: 150, density: 1700 },
      { thickness: 10, vs: 250, density: 1800 },
    ],
    halfspace: { vs: 600, density: 2000 },
  };
  return [
    await bench('parsePicksCsv, 30 picks', () => parsePicksCsv(small), { inner: 20 }),
    await bench('parsePicksCsv, 100,000 picks (the row limit)', () => parsePicksCsv(large), { samples: 11, warmup: 2 }),
    await bench('picksToCsv, 30 picks', () => picksToCsv(picks), { inner: 20 }),
    await bench('siteFigures, 2 layers', () => siteFigures(model), { inner: 100 }),
    await bench(
      'siteFiguresForRanges, one layer, 8 corners',
      () =>
        siteFiguresForRanges(
          { thickness: 12, vs1: 280, vs2: 520, density1: 1800, density2: 2000 },
          { thickness: [10, 14], vs1: [250, 300], vs2: [450, 600] },
        ),
      { inner: 100 },
    ),
  ];
}
