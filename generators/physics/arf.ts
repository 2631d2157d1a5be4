/**
 * Effective area on a response energy grid: mirror area × detector efficiency. The mirror table is
 * interpolated log-log (linear where an end point is zero). `effectiveArea` gives the bin average of
 * mirror × efficiency (a flat spectrum inside each bin, edges and table knots resolved:
 * bin-average.ts); `mirrorAreaAtBinCentres` samples the mirror at (ENERG_LO+ENERG_HI)/2 for plots.
 */
import { KilnInputError } from '../errors.ts';
import type { ArfData } from '../response/types.ts';
import type { DetectorStack } from './types.ts';
import { efficiencyBreakdown, type EfficiencyOptions } from './efficiency.ts';
import { binAverages, binQuadrature } from './bin-average.ts';
import { stackEdgesKeV } from './stack-edges.ts';
import { exp, log } from '../numeric/index.ts';

export interface MirrorAreaTable {
  energyKeV: ArrayLike<number>;
  areaCm2: ArrayLike<number>;
  /** File the table came from, named in error messages (as generators/content's MirrorArea has it). */
  file?: string;
}

/** Relative slack when deciding whether the table covers the grid (text round-off). */
const COVER_SLACK = 1e-9;

function checkMirror(t: MirrorAreaTable): void {
  const file = t.file;
  const n = t.energyKeV?.length ?? 0;
  if (n < 2 || t.areaCm2?.length !== n) {
    throw new KilnInputError('mirror area table needs at least two rows and as many areas as energies', {
      file,
      field: 'energyKeV/areaCm2',
      value: { energies: n, areas: t.areaCm2?.length ?? 0 },
      expected: 'two arrays of equal length >= 2',
    });
  }
  for (let i = 0; i < n; i++) {
    const e = t.energyKeV[i];
    const a = t.areaCm2[i];
    if (!(Number.isFinite(e) && e > 0) || (i > 0 && !(e > t.energyKeV[i - 1]))) {
      throw new KilnInputError(`mirror area table: energy in row ${i + 1} is not positive and strictly increasing`, {
        file,
        field: `energyKeV[${i}]`,
        value: e,
        expected: 'positive energies in strictly increasing order (keV)',
      });
    }
    if (!(Number.isFinite(a) && a >= 0)) {
      throw new KilnInputError(`mirror area table: area in row ${i + 1} is not a number >= 0`, { file, field: `areaCm2[${i}]`, value: a, expected: 'an area >= 0 cm²' });
    }
  }
}

function checkGrid(lo: Float64Array, hi: Float64Array): void {
  if (lo.length === 0 || lo.length !== hi.length) {
    throw new KilnInputError('response energy grid: ENERG_LO and ENERG_HI must be non-empty and of equal length', {
      field: 'energyGrid',
      value: { lo: lo.length, hi: hi.length },
      expected: 'equal non-zero lengths',
    });
  }
  for (let i = 0; i < lo.length; i++) {
    if (!(lo[i] > 0 && hi[i] > lo[i]) || (i > 0 && lo[i] < hi[i - 1] * (1 - COVER_SLACK))) {
      throw new KilnInputError(`response energy grid: bin ${i + 1} is not increasing`, {
        field: `ENERG_LO/ENERG_HI[${i}]`,
        value: [lo[i], hi[i]],
        expected: '0 < ENERG_LO < ENERG_HI, bins in increasing order',
      });
    }
  }
}

/** Mirror area at the centre of each bin, cm². The table must cover [ENERG_LO[0], ENERG_HI[last]]. */
export function mirrorAreaAtBinCentres(table: MirrorAreaTable, energLoKeV: Float64Array, energHiKeV: Float64Array): Float64Array {
  checkGrid(energLoKeV, energHiKeV);
  checkCovers(table, energLoKeV[0], energHiKeV[energHiKeV.length - 1]);
  return mirrorAreaAt(table, energLoKeV.map((lo, i) => 0.5 * (lo + energHiKeV[i])));
}

function checkCovers(table: MirrorAreaTable, gridLo: number, gridHi: number): void {
  checkMirror(table);
  const e = table.energyKeV;
  const n = e.length;
  if (e[0] > gridLo * (1 + COVER_SLACK) || e[n - 1] < gridHi * (1 - COVER_SLACK)) {
    throw new KilnInputError('mirror area table does not cover the response energy grid', {
      file: table.file,
      field: 'energyKeV',
      value: `${e[0]}–${e[n - 1]} keV`,
      expected: `a table spanning at least ${gridLo}–${gridHi} keV`,
    });
  }
}

/** Mirror area at ascending energies (clamped to the table's ends), cm²; the table is checked by the callers. */
function mirrorAreaAt(table: MirrorAreaTable, energiesKeV: Float64Array): Float64Array {
  const e = table.energyKeV;
  const a = table.areaCm2;
  const n = e.length;
  const out = new Float64Array(energiesKeV.length);
  let k = 0;
  for (let i = 0; i < out.length; i++) {
    const x = Math.min(Math.max(energiesKeV[i], e[0]), e[n - 1]);
    while (k < n - 2 && x > e[k + 1]) k++;
    const [e0, e1, a0, a1] = [e[k], e[k + 1], a[k], a[k + 1]];
    if (a0 > 0 && a1 > 0) out[i] = exp(log(a0) + (log(a1 / a0) * log(x / e0)) / log(e1 / e0));
    else out[i] = a0 + ((a1 - a0) * (x - e0)) / (e1 - e0);
  }
  return out;
}

/** Bin centres, keV. */
export function binCentresKeV(energLoKeV: Float64Array, energHiKeV: Float64Array): Float64Array {
  checkGrid(energLoKeV, energHiKeV);
  return energLoKeV.map((lo, i) => 0.5 * (lo + energHiKeV[i]));
}

export interface BinAveragedArea extends Pick<ArfData, 'energLoKeV' | 'energHiKeV' | 'specrespCm2'> {
  /** Bin average of the detector efficiency alone (the SPECRESP without the mirror's weighting). */
  detectorQE: Float64Array;
}

/**
 * SPECRESP (cm²) of an ARF: the average over each bin of mirror area × detector efficiency, the
 * bins cut at every cross-section edge of the stack and every knot of the mirror table.
 * `extraPerIncident` adds events per incident photon that the efficiency does not count (Si
 * fluorescence from the stack reaching the sensor), evaluated at the same quadrature nodes.
 */
export function effectiveArea(
  stack: DetectorStack,
  mirror: MirrorAreaTable,
  energLoKeV: Float64Array,
  energHiKeV: Float64Array,
  dateIso: string | null,
  opts: EfficiencyOptions & { extraPerIncident?: (energiesKeV: Float64Array) => Float64Array } = {},
): BinAveragedArea {
  checkGrid(energLoKeV, energHiKeV);
  checkCovers(mirror, energLoKeV[0], energHiKeV[energHiKeV.length - 1]);
  const q = binQuadrature(energLoKeV, energHiKeV, [...stackEdgesKeV(stack), ...Array.from(mirror.energyKeV)]);
  const qe = efficiencyBreakdown(stack, q.energiesKeV, dateIso, opts).detectorQE;
  if (opts.extraPerIncident) {
    const extra = opts.extraPerIncident(q.energiesKeV);
    for (let j = 0; j < qe.length; j++) qe[j] += extra[j];
  }
  const area = mirrorAreaAt(mirror, q.energiesKeV);
  const specrespCm2 = binAverages(q, area.map((v, j) => v * qe[j]));
  return { energLoKeV: Float64Array.from(energLoKeV), energHiKeV: Float64Array.from(energHiKeV), specrespCm2, detectorQE: binAverages(q, qe) };
}
