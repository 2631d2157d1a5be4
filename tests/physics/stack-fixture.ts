/** An invented demo detector stack (fictional mission), shared by the efficiency and ARF tests. */
import type { DetectorStack } from '../../generators/physics/types.ts';

export const DEMO_STACK: DetectorStack = {
  filters: [
    { name: 'blocking film', kind: 'filter', material: { formula: 'C22H10N2O5', densityGcm3: 1.42 }, thicknessUm: 0.2 },
    { name: 'blocking metal', kind: 'filter', material: { formula: 'Al', densityGcm3: 2.699 }, thicknessUm: 0.08 },
  ],
  contamination: {
    name: 'molecular film',
    material: { formula: 'C8H8', densityGcm3: 1.0 },
    law: { kind: 'linear', referenceDate: '2025-01-01', thicknessAtReferenceUm: 0.02, rateUmPerYear: 0.04 },
  },
  surface: [
    { name: 'oxide', kind: 'surface', material: { formula: 'SiO2', densityGcm3: 2.2 }, thicknessUm: 0.03 },
    { name: 'gates', kind: 'surface', material: { formula: 'Si', densityGcm3: 2.329 }, thicknessUm: 0.1 },
  ],
  sensor: { material: { formula: 'Si', densityGcm3: 2.329 }, depletionUm: 40, partial: { thicknessUm: 0.2, collectionAtSurface: 0.5 } },
};
