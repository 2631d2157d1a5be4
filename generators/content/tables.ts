/**
 * The two CSV tables of the content tree: a release's line fits (one row per measured line, a
 * column per LineFit field) and an instrument's mirror effective area. Row-level sanity only;
 * checks that need the detector model (Fano limit, energy grid) are in resolve.ts. Pure.
 */
import { KilnInputError } from '../errors.ts';
import type { LineFit } from '../response/model-types.ts';
import { headerName, parseCsv, type CsvColumn, type CsvRow } from './csv.ts';

/**
 * Header: line,energy_keV,centroid_keV,centroid_err_eV,fwhm_eV,fwhm_err_eV,tail_fraction,tail_fraction_err,tail_scale_eV,shelf_fraction,efficiency,efficiency_err
 * and optionally tail_scale_err_eV and shelf_fraction_err (1σ errors of the tail scale and the
 * shelf; without them those two parameters are shown but not judged by closure).
 */
export const LINE_FIT_COLUMNS: readonly CsvColumn[] = [
  { key: 'line', name: 'line', unit: null, type: 'text' },
  { key: 'energyKeV', name: 'energy', unit: 'keV', type: 'number' },
  { key: 'centroidKeV', name: 'centroid', unit: 'keV', type: 'number' },
  { key: 'centroidErrEv', name: 'centroid_err', unit: 'eV', type: 'number' },
  { key: 'fwhmEv', name: 'fwhm', unit: 'eV', type: 'number' },
  { key: 'fwhmErrEv', name: 'fwhm_err', unit: 'eV', type: 'number' },
  { key: 'tailFraction', name: 'tail_fraction', unit: null, type: 'number' },
  { key: 'tailFractionErr', name: 'tail_fraction_err', unit: null, type: 'number' },
  { key: 'tailScaleEv', name: 'tail_scale', unit: 'eV', type: 'number' },
  { key: 'shelfFraction', name: 'shelf_fraction', unit: null, type: 'number' },
  { key: 'efficiency', name: 'efficiency', unit: null, type: 'number', nullable: true },
  { key: 'efficiencyErr', name: 'efficiency_err', unit: null, type: 'number', nullable: true },
  { key: 'tailScaleErrEv', name: 'tail_scale_err', unit: 'eV', type: 'number', nullable: true, optional: true },
  { key: 'shelfFractionErr', name: 'shelf_fraction_err', unit: null, type: 'number', nullable: true, optional: true },
  /** Optional: the row band (of the detector's regions) the line was measured in; empty = the whole detector. */
  { key: 'region', name: 'region', unit: null, type: 'text', nullable: true, optional: true },
];

/** Header: energy_keV,area_cm2 */
export const MIRROR_AREA_COLUMNS: readonly CsvColumn[] = [
  { key: 'energyKeV', name: 'energy', unit: 'keV', type: 'number' },
  { key: 'areaCm2', name: 'area', unit: 'cm2', type: 'number' },
];

/**
 * A measured centroid further than this fraction from the line energy is taken as a units slip
 * (eV written as keV) or a wrong line label, not as a gain error (common practice, no source).
 */
export const MAX_CENTROID_DEVIATION = 0.2;

export interface LineFitTable {
  file: string;
  fits: LineFit[];
  /** Source line of each fit, for later errors. */
  lines: number[];
}

export interface MirrorArea {
  file: string;
  energyKeV: number[];
  areaCm2: number[];
}

function columnByKey(key: string, cols: readonly CsvColumn[]): CsvColumn {
  return cols.find((c) => c.key === key)!;
}

function fail(file: string, row: CsvRow, key: string, cols: readonly CsvColumn[], message: string, expected: string): never {
  throw new KilnInputError(message, {
    file,
    line: row.line,
    field: `${headerName(columnByKey(key, cols))} (column ${row.columnOf[key]})`,
    value: row.values[key],
    expected,
  });
}

export function parseLineFits(text: string, file: string): LineFitTable {
  const t = parseCsv(text, file, LINE_FIT_COLUMNS);
  const C = LINE_FIT_COLUMNS;
  const seen = new Map<string, number>();
  const fits = t.rows.map((row): LineFit => {
    const v = row.values as Record<string, number>;
    const need = (key: string, ok: (x: number) => boolean, expected: string, message = 'out of range') => {
      if (!ok(v[key])) fail(file, row, key, C, message, expected);
    };
    const label = row.values.line as string;
    const region = typeof row.values.region === 'string' ? row.values.region : undefined;
    const key = `${label}\u0000${region ?? ''}`;
    if (seen.has(key)) fail(file, row, 'line', C, `line "${label}"${region ? ` in region ${region}` : ''} is listed twice (also line ${seen.get(key)})`, 'one row per line label and region');
    seen.set(key, row.line);
    need('energyKeV', (x) => x > 0, '> 0 keV');
    need('centroidKeV', (x) => x > 0, '> 0 keV');
    need(
      'centroidKeV',
      (x) => Math.abs(x - v.energyKeV) <= MAX_CENTROID_DEVIATION * v.energyKeV,
      `within ${MAX_CENTROID_DEVIATION * 100}% of energy_keV = ${v.energyKeV} (units slip or wrong line?)`,
      'centroid far from the line energy',
    );
    need('centroidErrEv', (x) => x > 0, '> 0 eV (a 1σ error; zero would give infinite weight)');
    need('fwhmEv', (x) => x > 0, '> 0 eV');
    need('fwhmErrEv', (x) => x > 0, '> 0 eV (a 1σ error)');
    need('tailFraction', (x) => x >= 0 && x < 1, 'in [0, 1)');
    need('tailFractionErr', (x) => x > 0, '> 0 (a 1σ error)');
    need('tailScaleEv', (x) => x > 0, '> 0 eV');
    need('shelfFraction', (x) => x >= 0 && x < 1, 'in [0, 1)');
    need('shelfFraction', (x) => x + v.tailFraction < 1, `< 1 − tail_fraction = ${1 - v.tailFraction}`, 'tail and shelf leave no events in the peak');
    const eff = row.values.efficiency as number | null;
    const effErr = row.values.efficiencyErr as number | null;
    if ((eff === null) !== (effErr === null))
      fail(file, row, eff === null ? 'efficiency' : 'efficiencyErr', C, 'efficiency and efficiency_err must be given together', 'both empty or both numbers');
    if (eff !== null) need('efficiency', (x) => x > 0, '> 0');
    if (effErr !== null) need('efficiencyErr', (x) => x > 0, '> 0 (a 1σ error)');
    // Optional columns: keys present only when the file has the column, so older tables resolve
    // (and fingerprint) exactly as before.
    const extra: Partial<LineFit> = {};
    for (const key of ['tailScaleErrEv', 'shelfFractionErr'] as const) {
      if (!(key in row.values)) continue;
      const x = row.values[key] as number | null;
      if (x !== null) need(key, (y) => y > 0, '> 0 (a 1σ error), or empty');
      extra[key] = x;
    }
    return {
      line: label,
      energyKeV: v.energyKeV,
      centroidKeV: v.centroidKeV,
      centroidErrEv: v.centroidErrEv,
      fwhmEv: v.fwhmEv,
      fwhmErrEv: v.fwhmErrEv,
      tailFraction: v.tailFraction,
      tailFractionErr: v.tailFractionErr,
      tailScaleEv: v.tailScaleEv,
      shelfFraction: v.shelfFraction,
      efficiency: eff,
      efficiencyErr: effErr,
      ...extra,
      // Only present when given, so tables without regions fingerprint as before.
      ...(region !== undefined ? { region } : {}),
    };
  });
  if (fits.length === 0) throw new KilnInputError('no line fits', { file, line: t.headerLine, expected: 'at least one row after the header' });
  return { file, fits, lines: t.rows.map((r) => r.line) };
}

/** Minimum rows for an interpolated curve. */
const MIN_MIRROR_ROWS = 2;

export function parseMirrorArea(text: string, file: string): MirrorArea {
  const t = parseCsv(text, file, MIRROR_AREA_COLUMNS);
  const C = MIRROR_AREA_COLUMNS;
  t.rows.forEach((row, i) => {
    const e = row.values.energyKeV as number;
    const a = row.values.areaCm2 as number;
    if (!(e > 0)) fail(file, row, 'energyKeV', C, 'out of range', '> 0 keV');
    if (!(a >= 0)) fail(file, row, 'areaCm2', C, 'negative effective area', '≥ 0 cm2');
    const prev = t.rows[i - 1];
    if (prev && !(e > (prev.values.energyKeV as number)))
      fail(file, row, 'energyKeV', C, 'energies not strictly increasing', `> ${prev.values.energyKeV} keV (the previous row, line ${prev.line})`);
  });
  if (t.rows.length < MIN_MIRROR_ROWS)
    throw new KilnInputError('too few rows for an area curve', { file, line: t.headerLine, value: t.rows.length, expected: `at least ${MIN_MIRROR_ROWS} rows` });
  return { file, energyKeV: t.rows.map((r) => r.values.energyKeV as number), areaCm2: t.rows.map((r) => r.values.areaCm2 as number) };
}
