/**
 * `shearfield site MODEL.json | ESTIMATE.json`: site figures of a layered
 * model, or of a thickness estimate (the JSON `shearfield estimate` prints:
 * figures over its 95 % intervals, and its verdict carried along).
 *
 * Output contract (read by other tools, keep the first keys exact):
 *   {"vs30_m_s":…,"vs100ft_m_s":…,"site_class":{"asce7_16":[…],"asce7_22":[…],"en1998_1":[…]},
 *    "f0_hz":…,"t0_s":…,"impedance_ratio":…,"warnings":[…],"caution":"…"}
 * Class values are arrays so that a range crossing a boundary lists every class.
 */
import { parseArgs } from 'node:util';
import { estimateFromJson, looksLikeEstimateJson } from '../../core/estimate/estimate-json';
import { InputError } from '../../core/shared/errors';
import { siteFigures, siteFiguresOfEstimate, VS100FT_DEPTH_M, type FigureRange, type SiteFigures } from '../../core/site/site';
import { oneModelPath, readModelFile, readTextFile } from '../cli-options';
import type { Command, CommandIO } from '../command';

const HELP = `Usage: shearfield site MODEL.json [--estimated-velocities]
       shearfield site ESTIMATE.json

Site figures of a layered model (N layers over a half-space), or of a thickness
estimate saved from shearfield estimate (ESTIMATE.json, see below):
  vs30_m_s         Vs30 = 30 / Σ(h_i/v_i) over the top 30 m (EN 1998-1:2004 eq. 3.1).
  vs100ft_m_s      The same average over the top 100 ft = ${VS100FT_DEPTH_M} m (ASCE/SEI 7-16 §20.4).
                   Where the layers end above that depth, the half-space continues down.
  site_class       Every class the average speed allows in each table, as a list:
                     asce7_16  ASCE/SEI 7-16 Table 20.3-1 (A–E, from vs100ft_m_s)
                     asce7_22  ASCE/SEI 7-22 Table 20.2-1 (A, B, BC, C, CD, D, DE, E, from vs100ft_m_s)
                     en1998_1  EN 1998-1:2004 Table 3.1 (A–D from vs30_m_s; E when 5–20 m of
                               soil slower than 360 m/s lies on material faster than 800 m/s)
                   Classes the speeds cannot decide (ASCE F, EN S1 and S2) are in the warnings.
  f0_hz, t0_s      Fundamental site frequency and period, f0 = β1/(4H), T0 = 4H/β1
                   (Kramer, Geotechnical Earthquake Engineering, 1996, ch. 7). With several
                   layers: the approximation f0 ≈ 1/(4 Σ h_i/β_i), labelled in the warnings.
  impedance_ratio  ρ1β1/(ρ2β2) of the layers over the half-space (with several layers, of
                   their travel-time average speed and mean density; labelled in the warnings).
  warnings         Plain-words notes: what the tool cannot decide, approximations.
  caution          Screening only: site characterisation for structures must follow local
                   codes and licensed geotechnical practice.

MODEL.json holds, in SI units named in the fields:
  {"layers":[{"thickness_m":10,"vs_m_s":200,"density_kg_m3":1800}],
   "halfspace":{"vs_m_s":900,"density_kg_m3":2200}}

Options:
  --estimated-velocities  A ±30 % speed sensitivity check of your choosing (no standard
                          prescribes it here): the ASCE/SEI 7-22 classes also cover the
                          average speed divided and multiplied by 1.3. For a model file
                          or an estimate. Default: off.
  -h, --help              Show this help.

Output: one line of JSON,
  {"vs30_m_s":…,"vs100ft_m_s":…,"site_class":{"asce7_16":[…],"asce7_22":[…],"en1998_1":[…]},
   "f0_hz":…,"t0_s":…,"impedance_ratio":…,"warnings":[…],"caution":"…"}

ESTIMATE.json: the output of shearfield estimate (for example
  shearfield estimate picks.csv > estimate.json; shearfield site estimate.json).
  The figures are those of the best model, with the classes over the box of the
  95 % intervals; an open interval end (one the data do not bound) makes the
  figures open on that side, so the classes list every class it allows. The
  output has the keys above, then
  "ranges":{"vs30_m_s":[low,high],"vs100ft_m_s":[…],"f0_hz":[…],"t0_s":[…],"impedance_ratio":[…]}
  (null for an end the data do not bound: read the other end as "at least" or
  "at most") and the estimate's
  "verdict":{"level":"resolved | rough | unresolved","text":"…"}, unchanged: figures
  from an estimate whose thickness is not resolved are not resolved either, and
  the verdict's sentence says so ("not resolved").

A layered estimate (shearfield estimate --layers N > profile.json) gives the
figures of its best model, the classes over its ensemble's 95 % range,
"ranges":{"vs30_m_s":[low,high],"vs100ft_m_s":[low,high]} over the ensemble,
and its "verdict" unchanged.

Exit status: 0 success; 1 bad file or model (one line on stderr naming the field);
2 usage error.`;

const site: Command = {
  name: 'site',
  summary: 'Site figures of a layered model or an estimate: Vs30, site classes, f0 and T0, impedance ratio.',
  help: HELP,
  async run(args: string[], io: CommandIO): Promise<number> {
    const { values, positionals } = parseArgs({
      args,
      options: {
        'estimated-velocities': { type: 'boolean', default: false },
      },
      allowPositionals: true,
      strict: true,
    });
    const path = oneModelPath(positionals, 'shearfield site model.json');
    let parsed: unknown = undefined;
    try {
      parsed = JSON.parse(readTextFile(path, 'MODEL.json', 'model'));
    } catch (e) {
      if (e instanceof InputError) throw e;
      // Not JSON: readModelFile below says so in its own words.
    }
    if (looksLikeEstimateJson(parsed)) {
      let est;
      try {
        est = estimateFromJson(parsed);
      } catch (e) {
        if (e instanceof InputError) throw new InputError(e.field, `The estimate file "${path}" is invalid: ${e.message}`);
        throw e;
      }
      // The one path shared with the estimate itself: open interval ends make the figures open (site.ts).
      const s = siteFiguresOfEstimate(
        { thickness: est.thickness, vs1: est.vs1, vs2: est.vs2, density1: est.density1, density2: est.density2 },
        { estimatedVelocities: values['estimated-velocities'] },
      );
      if (est.verdict.level === 'unresolved') {
        s.warnings.unshift('The layer thickness is not resolved (see the verdict), so these figures rest on a thickness the picks do not resolve.');
      }
      // An end the data do not bound (from an open interval end) is null, never a number that reads like a bound.
      const ends = (r: FigureRange) => [r.openLow ? null : finiteOrNull(r.low), r.openHigh ? null : finiteOrNull(r.high)];
      io.out(
        JSON.stringify({
          ...figuresJson(s),
          ranges: {
            vs30_m_s: ends(s.vs30),
            vs100ft_m_s: ends(s.vs100ft),
            f0_hz: ends(s.f0_hz),
            t0_s: ends(s.t0_s),
            impedance_ratio: ends(s.impedance_ratio),
          },
          verdict: est.verdict,
        }) + '\n',
      );
      return 0;
    }
    if (parsed && typeof parsed === 'object' && 'profile' in parsed) {
      io.out(JSON.stringify(layeredFigures(parsed as Record<string, unknown>, path, values['estimated-velocities'])) + '\n');
      return 0;
    }
    const model = readModelFile(path);
    const s = siteFigures(model, { estimatedVelocities: values['estimated-velocities'] });
    io.out(JSON.stringify(figuresJson(s)) + '\n');
    return 0;
  },
};

/**
 * Site figures of a layered estimate (the JSON of `shearfield estimate
 * --layers N`): those of its best model, with the classes, Vs30 and v̄s100ft
 * ranges over its ensemble (the 95 % range the estimate computed), and its
 * verdict carried unchanged.
 */
function layeredFigures(j: Record<string, unknown>, path: string, estimatedVelocities: boolean) {
  const bad = (field: string, what: unknown): never => {
    throw new InputError(field, `The estimate file "${path}" is invalid: ${field} must be a number, but it is ${JSON.stringify(what) ?? 'missing'}.`);
  };
  const at = (o: unknown, keys: (string | number)[]): number => {
    let v: unknown = o;
    for (const k of keys) v = v && typeof v === 'object' ? (v as Record<string | number, unknown>)[k] : undefined;
    if (typeof v !== 'number' || !Number.isFinite(v)) bad(keys.map((k) => (typeof k === 'number' ? `[${k}]` : `.${k}`)).join('').slice(1), v);
    return v as number;
  };
  const profile = j.profile as { layers?: unknown[] } | undefined;
  const n = Array.isArray(profile?.layers) ? profile!.layers.length : 0;
  if (n === 0) throw new InputError('profile.layers', `The estimate file "${path}" is invalid: profile.layers must list at least one layer.`);
  const layers = Array.from({ length: n }, (_, i) => ({
    thickness: at(j, ['profile', 'layers', i, 'thickness_m', 'best']),
    vs: at(j, ['profile', 'layers', i, 'vs_m_s', 'best']),
    density: at(j, ['density_kg_m3', 'layers', i]),
  }));
  const model = { layers, halfspace: { vs: at(j, ['profile', 'halfspace', 'vs_m_s', 'best']), density: at(j, ['density_kg_m3', 'halfspace']) } };
  const s = siteFigures(model, { estimatedVelocities });
  const verdict = j.verdict as { level?: string } | undefined;
  if (verdict?.level === 'unresolved') {
    s.warnings.unshift('The layered profile is not resolved (see the verdict), so these figures rest on layers the picks do not resolve.');
  }
  const ensembleClasses = j.site_class as Record<string, { classes?: string[] }> | undefined;
  const classes = {
    asce7_16: ensembleClasses?.asce7_16?.classes ?? s.classes.asce7_16,
    asce7_22: ensembleClasses?.asce7_22?.classes ?? s.classes.asce7_22,
    en1998_1: ensembleClasses?.en1998_1?.classes ?? s.classes.en1998_1,
  };
  return {
    ...figuresJson(s),
    site_class: classes,
    ranges: {
      vs30_m_s: [at(j, ['vs30_m_s', 'low95']), at(j, ['vs30_m_s', 'high95'])],
      vs100ft_m_s: [at(j, ['vs100ft_m_s', 'low95']), at(j, ['vs100ft_m_s', 'high95'])],
    },
    verdict: j.verdict,
  };
}

function finiteOrNull(x: number): number | null {
  return Number.isFinite(x) ? x : null;
}

/** The contract keys, in order. */
function figuresJson(s: SiteFigures) {
  return {
    vs30_m_s: s.vs30.best,
    vs100ft_m_s: s.vs100ft.best,
    site_class: { asce7_16: s.classes.asce7_16, asce7_22: s.classes.asce7_22, en1998_1: s.classes.en1998_1 },
    f0_hz: s.f0_hz.best,
    t0_s: s.t0_s.best,
    impedance_ratio: s.impedance_ratio.best,
    warnings: s.warnings,
    caution: s.caution,
  };
}

export default site;
