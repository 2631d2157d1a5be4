/**
 * Layer-by-layer efficiency of a detector stack: filters, contamination (on a date), surface layers,
 * then absorption in the sensor. detectorQE is the product of all components: the fraction of
 * photons arriving at the first filter that are detected.
 */
import { KilnInputError } from '../errors.ts';
import type { DetectorStack, MaterialSpec } from './types.ts';
import { contaminationThicknessUm, contaminationTransmission } from './contamination.ts';
import { sensorAbsorption } from './detector.ts';
import { layerTransmission } from './layers.ts';

export type ComponentKind = 'filter' | 'contamination' | 'surface' | 'sensor';

export interface EfficiencyComponent {
  name: string;
  kind: ComponentKind;
  /** Transmission (layers) or absorbed-and-collected probability (sensor), per energy. */
  values: Float64Array;
}

export interface EfficiencyBreakdown {
  components: EfficiencyComponent[];
  detectorQE: Float64Array;
  /** Contamination thickness on the date, µm (0 without a contamination layer). */
  contaminationUm: number;
}

function checkStack(stack: DetectorStack): void {
  if (!stack || !Array.isArray(stack.filters) || !Array.isArray(stack.surface) || !stack.sensor) {
    throw new KilnInputError('detector stack needs filters[], surface[], contamination (or null) and sensor', {
      field: 'stack',
      expected: '{ filters, contamination, surface, sensor }',
    });
  }
}

export interface EfficiencyOptions {
  /**
   * The redistribution matrix carries the partially collecting layer's events (partial-charge
   * model, generators/response/collection-params.ts): the sensor then counts every photoabsorbed
   * photon, collected fully or not; the matrix moves the partial ones into the tail or under the
   * threshold. Default false: the layer's uncollected charge is counted as lost here.
   */
  partialChargeInMatrix?: boolean;
}

/**
 * Efficiency components at each energy. `dateIso` (YYYY-MM-DD) is needed only when the stack has a
 * contamination layer; null otherwise.
 */
export function efficiencyBreakdown(stack: DetectorStack, energiesKeV: Float64Array, dateIso: string | null, opts: EfficiencyOptions = {}): EfficiencyBreakdown {
  checkStack(stack);
  const components: EfficiencyComponent[] = [];
  for (const f of stack.filters) components.push({ name: f.name, kind: 'filter', values: layerTransmission(f, energiesKeV) });
  let contaminationUm = 0;
  if (stack.contamination) {
    if (dateIso === null) {
      throw new KilnInputError(`an observation date is needed for contamination layer "${stack.contamination.name}"`, {
        field: 'date',
        expected: 'a date YYYY-MM-DD',
      });
    }
    contaminationUm = contaminationThicknessUm(stack.contamination, dateIso);
    components.push({ name: stack.contamination.name, kind: 'contamination', values: contaminationTransmission(stack.contamination, energiesKeV, dateIso) });
  }
  for (const s of stack.surface) components.push({ name: s.name, kind: 'surface', values: layerTransmission(s, energiesKeV) });
  components.push({ name: 'sensor', kind: 'sensor', values: sensorAbsorption(stack.sensor, energiesKeV, { allAbsorbed: opts.partialChargeInMatrix === true }) });
  const detectorQE = new Float64Array(energiesKeV.length).fill(1);
  for (const c of components) for (let j = 0; j < detectorQE.length; j++) detectorQE[j] *= c.values[j];
  return { components, detectorQE, contaminationUm };
}

export interface EfficiencyTableRow {
  name: string;
  kind: ComponentKind;
  formula: string;
  densityGcm3: number;
  /** Layer thickness; for the sensor, depletion depth (partial layer given separately). */
  thicknessUm: number;
  partialUm?: number;
  collectionAtSurface?: number;
  values: number[];
}

export interface EfficiencyTable {
  energiesKeV: number[];
  date: string | null;
  contaminationUm: number;
  components: EfficiencyTableRow[];
  total: number[];
}

/** The plain (JSON-ready) table printed by `kiln efficiency`. */
export function efficiencyTable(stack: DetectorStack, energiesKeV: Float64Array, dateIso: string | null): EfficiencyTable {
  const b = efficiencyBreakdown(stack, energiesKeV, dateIso);
  const mat = (m: MaterialSpec) => ({ formula: m.formula, densityGcm3: m.densityGcm3 });
  const specs: Omit<EfficiencyTableRow, 'values' | 'name' | 'kind'>[] = [
    ...stack.filters.map((f) => ({ ...mat(f.material), thicknessUm: f.thicknessUm })),
    ...(stack.contamination ? [{ ...mat(stack.contamination.material), thicknessUm: b.contaminationUm }] : []),
    ...stack.surface.map((s) => ({ ...mat(s.material), thicknessUm: s.thicknessUm })),
    {
      ...mat(stack.sensor.material),
      thicknessUm: stack.sensor.depletionUm,
      ...(stack.sensor.partial ? { partialUm: stack.sensor.partial.thicknessUm, collectionAtSurface: stack.sensor.partial.collectionAtSurface } : {}),
    },
  ];
  return {
    energiesKeV: Array.from(energiesKeV),
    date: dateIso,
    contaminationUm: b.contaminationUm,
    components: b.components.map((c, i) => ({ name: c.name, kind: c.kind, ...specs[i], values: Array.from(c.values) })),
    total: Array.from(b.detectorQE),
  };
}
