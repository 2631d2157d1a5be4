/**
 * A source model: components times cold-gas absorption, with named numeric parameters
 * ("absorption.columnCm2", "<component>.<field>") and their physical bounds.
 */
import { KilnInputError } from '../errors.ts';
import type { AbundanceTable } from './data/abundances.ts';
import type { Component } from './components.ts';

export interface SourceModel {
  /** H atoms per cm² of the absorbing column. */
  columnCm2: number;
  abundances: AbundanceTable;
  components: Component[];
}

export interface ParameterInfo {
  name: string;
  value: number;
  /** Physical bounds (the fit never leaves them). */
  min: number;
  max: number;
  unit: string;
}

export const COLUMN_PARAMETER = 'absorption.columnCm2';
/** Columns above this are opaque below 10 keV: a typo, not a source (common practice, no source). */
export const MAX_COLUMN_CM2 = 1e25;
/** Temperatures of our continua, keV: below 1 eV nothing reaches 0.1 keV; above 200 keV the shape is flat in our band. */
export const MIN_KT_KEV = 1e-3;
export const MAX_KT_KEV = 200;
/** Photon indices seen in X-ray sources lie well within this (common practice, no source). */
export const MIN_PHOTON_INDEX = -3;
export const MAX_PHOTON_INDEX = 10;
/** A line wider than this is a continuum (σ in keV). */
export const MAX_LINE_SIGMA_KEV = 1;

interface FieldSpec {
  field: string;
  min: number;
  max: number;
  unit: string;
}

const FLUX_UNIT = 'photons/cm2/s';
const DENSITY_UNIT = 'photons/cm2/s/keV';

export const COMPONENT_FIELDS: Record<Component['kind'], FieldSpec[]> = {
  'power-law': [
    { field: 'photonIndex', min: MIN_PHOTON_INDEX, max: MAX_PHOTON_INDEX, unit: '' },
    { field: 'normAt1KeV', min: 0, max: Infinity, unit: DENSITY_UNIT },
  ],
  blackbody: [
    { field: 'kTKeV', min: MIN_KT_KEV, max: MAX_KT_KEV, unit: 'keV' },
    { field: 'photonFluxCm2s', min: 0, max: Infinity, unit: FLUX_UNIT },
  ],
  bremsstrahlung: [
    { field: 'kTKeV', min: MIN_KT_KEV, max: MAX_KT_KEV, unit: 'keV' },
    { field: 'normAt1KeV', min: 0, max: Infinity, unit: DENSITY_UNIT },
  ],
  'gaussian-line': [
    { field: 'energyKeV', min: 0, max: Infinity, unit: 'keV' },
    { field: 'sigmaKeV', min: 0, max: MAX_LINE_SIGMA_KEV, unit: 'keV' },
    { field: 'photonFluxCm2s', min: 0, max: Infinity, unit: FLUX_UNIT },
  ],
};

export function modelParameters(m: SourceModel): ParameterInfo[] {
  const out: ParameterInfo[] = [{ name: COLUMN_PARAMETER, value: m.columnCm2, min: 0, max: MAX_COLUMN_CM2, unit: 'cm-2' }];
  for (const c of m.components)
    for (const f of COMPONENT_FIELDS[c.kind])
      out.push({ name: `${c.name}.${f.field}`, value: (c as unknown as Record<string, number>)[f.field], min: f.min, max: f.max, unit: f.unit });
  return out;
}

/** A copy of the model with the named parameters set. Unknown names → KilnInputError. */
export function withParameters(m: SourceModel, values: Readonly<Record<string, number>>): SourceModel {
  const out: SourceModel = { ...m, components: m.components.map((c) => ({ ...c })) };
  for (const [name, v] of Object.entries(values)) {
    if (name === COLUMN_PARAMETER) {
      out.columnCm2 = v;
      continue;
    }
    const dot = name.lastIndexOf('.');
    const c = out.components.find((x) => x.name === name.slice(0, dot));
    const field = name.slice(dot + 1);
    if (!c || !COMPONENT_FIELDS[c.kind].some((f) => f.field === field))
      throw new KilnInputError(`unknown parameter "${name}"`, { field: 'parameters', value: name, expected: `one of ${modelParameters(m).map((p) => p.name).join(', ')}` });
    (c as unknown as Record<string, number>)[field] = v;
  }
  return out;
}
