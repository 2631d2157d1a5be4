/** Plain descriptions of the detector's layers, as the content tree states them. */

/** A material from its chemical formula (e.g. "C22H10N2O5") and density. */
export interface MaterialSpec {
  formula: string;
  densityGcm3: number;
}

export type LayerKind = 'filter' | 'surface' | 'contamination';

export interface LayerSpec {
  name: string;
  kind: LayerKind;
  material: MaterialSpec;
  thicknessUm: number;
}

/**
 * Thickness of a contamination layer versus observation date.
 * - linear: t(d) = thicknessAtReferenceUm + rateUmPerYear · (d − referenceDate) / 365.25 d, floored at 0.
 * - exponential: t(d) = initialUm + (asymptoticUm − initialUm) · (1 − exp(−(d − startDate)/timescaleDays)),
 *   for d ≥ startDate, initialUm before.
 */
export type ContaminationLaw =
  | { kind: 'linear'; referenceDate: string; thicknessAtReferenceUm: number; rateUmPerYear: number }
  | { kind: 'exponential'; startDate: string; initialUm: number; asymptoticUm: number; timescaleDays: number };

export interface ContaminationSpec {
  name: string;
  material: MaterialSpec;
  law: ContaminationLaw;
}

/**
 * The sensitive silicon. depletionUm collects fully; an optional partially collecting layer of
 * thicknessUm lies at the illuminated surface, in which charge is collected with a probability that
 * rises linearly from collectionAtSurface (0..1) to 1 at its inner boundary.
 */
export interface SensorSpec {
  material: MaterialSpec;
  depletionUm: number;
  partial: { thicknessUm: number; collectionAtSurface: number } | null;
}

/** Everything in front of and including the sensor, in the order photons meet it. */
export interface DetectorStack {
  filters: LayerSpec[];
  contamination: ContaminationSpec | null;
  surface: LayerSpec[];
  sensor: SensorSpec;
}
