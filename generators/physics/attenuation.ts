/**
 * Mass attenuation coefficients of the elements, cm²/g, from the segmented xraylib table: log-log
 * interpolation inside a segment between two absorption edges, never across an edge. At an edge
 * energy itself the above-edge value is returned (as xraylib does).
 */
import { KilnInputError } from '../errors.ts';
import { element, TABLE_ENERGY_MAX_KEV, TABLE_ENERGY_MIN_KEV, type ElementData } from './elements.ts';
import { exp, log } from '../numeric/index.ts';

/** 'total': photoabsorption + coherent + incoherent scattering; 'photo': photoabsorption only. */
export type CrossSectionKind = 'total' | 'photo';

interface Segment {
  lnLo: number;
  /** (n − 1) / ln(eHi/eLo): grid index per unit of ln E. */
  perLn: number;
  n: number;
  lnPhoto: Float64Array;
  lnTotal: Float64Array;
}
interface Prepared {
  /** Lower bounds of segments 1..k (the edges), ascending. */
  edgesKeV: number[];
  segments: Segment[];
}

const PREPARED = new Map<number, Prepared>();

function prepare(el: ElementData): Prepared {
  let p = PREPARED.get(el.z);
  if (p) return p;
  p = {
    edgesKeV: el.segments.slice(1).map((s) => s.eLoKeV),
    segments: el.segments.map((s) => ({
      lnLo: log(s.eLoKeV),
      perLn: (s.photo.length - 1) / log(s.eHiKeV / s.eLoKeV),
      n: s.photo.length,
      lnPhoto: Float64Array.from(s.photo, (v) => log(v)),
      lnTotal: Float64Array.from(s.total, (v) => log(v)),
    })),
  };
  PREPARED.set(el.z, p);
  return p;
}

function checkEnergy(energyKeV: number, el: ElementData): void {
  if (!(energyKeV >= TABLE_ENERGY_MIN_KEV && energyKeV <= TABLE_ENERGY_MAX_KEV)) {
    throw new KilnInputError(`photon energy ${energyKeV} keV is outside the cross-section table (element ${el.symbol})`, {
      field: 'energyKeV',
      value: energyKeV,
      expected: `${TABLE_ENERGY_MIN_KEV} to ${TABLE_ENERGY_MAX_KEV} keV`,
    });
  }
}

function interpolate(p: Prepared, energyKeV: number, kind: CrossSectionKind): number {
  let k = 0;
  while (k < p.edgesKeV.length && energyKeV >= p.edgesKeV[k]) k++;
  const s = p.segments[k];
  const x = (log(energyKeV) - s.lnLo) * s.perLn;
  let i = Math.floor(x);
  if (i < 0) i = 0;
  if (i > s.n - 2) i = s.n - 2;
  const t = x - i;
  const v = kind === 'photo' ? s.lnPhoto : s.lnTotal;
  return exp(v[i] + (v[i + 1] - v[i]) * t);
}

/** μ/ρ of one element at one energy, cm²/g. Energy outside 0.1–20 keV → KilnInputError. */
export function massAttenuationCm2g(ref: string | number | ElementData, energyKeV: number, kind: CrossSectionKind = 'total'): number {
  const el = element(ref);
  checkEnergy(energyKeV, el);
  return interpolate(prepare(el), energyKeV, kind);
}

/** Vectorised μ/ρ, cm²/g, one value per energy (written into `out` when given). */
export function massAttenuationArrayCm2g(
  ref: string | number | ElementData,
  energiesKeV: Float64Array,
  kind: CrossSectionKind = 'total',
  out: Float64Array = new Float64Array(energiesKeV.length),
): Float64Array {
  const el = element(ref);
  const p = prepare(el);
  for (let j = 0; j < energiesKeV.length; j++) {
    checkEnergy(energiesKeV[j], el);
    out[j] = interpolate(p, energiesKeV[j], kind);
  }
  return out;
}
