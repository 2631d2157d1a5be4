/**
 * Transmission of a homogeneous layer, exp(−(μ/ρ)·ρ·t), with μ/ρ the total attenuation (a photon
 * scattered out of the beam is lost from it).
 */
import { KilnInputError } from '../errors.ts';
import type { LayerSpec, MaterialSpec } from './types.ts';
import { composition, materialMassAttenuationArrayCm2g } from './compound.ts';
import { exp } from '../numeric/index.ts';

export const CM_PER_UM = 1e-4;
/**
 * Upper bound on any material density, g/cm³: the densest element (osmium) is ≈22.6 g/cm³
 * (common practice, no source). A larger value is almost surely a unit mistake (kg/m³).
 */
export const MAX_DENSITY_GCM3 = 25;

/** Checks a material; `where` names it in errors (e.g. 'layer "filter Al"'). */
export function validateMaterial(material: MaterialSpec, where: string): void {
  const d = material?.densityGcm3;
  if (typeof d !== 'number' || !Number.isFinite(d) || d <= 0 || d > MAX_DENSITY_GCM3) {
    throw new KilnInputError(`${where}: density must be positive and at most ${MAX_DENSITY_GCM3} g/cm³`, {
      field: `${where}.material.densityGcm3`,
      value: d,
      expected: `0 < densityGcm3 <= ${MAX_DENSITY_GCM3} (g/cm³)`,
    });
  }
  try {
    composition(material.formula);
  } catch (e) {
    if (e instanceof KilnInputError) {
      throw new KilnInputError(`${where}: ${e.message}`, { ...e.where, field: `${where}.material.formula` });
    }
    throw e;
  }
}

function validateThickness(thicknessUm: number, where: string, allowZero: boolean): void {
  const ok = typeof thicknessUm === 'number' && Number.isFinite(thicknessUm) && (allowZero ? thicknessUm >= 0 : thicknessUm > 0);
  if (!ok) {
    throw new KilnInputError(`${where}: thickness must be ${allowZero ? 'zero or positive' : 'positive'}`, {
      field: `${where}.thicknessUm`,
      value: thicknessUm,
      expected: allowZero ? 'a finite thickness >= 0 µm' : 'a finite thickness > 0 µm',
    });
  }
}

/** exp(−(μ/ρ)·ρ·t) of a material at each energy; thickness 0 gives ones. */
export function materialTransmission(
  material: MaterialSpec,
  thicknessUm: number,
  energiesKeV: Float64Array,
  where = `material "${material?.formula}"`,
): Float64Array {
  validateMaterial(material, where);
  validateThickness(thicknessUm, where, true);
  const mu = materialMassAttenuationArrayCm2g(material.formula, energiesKeV, 'total');
  const columnGcm2 = material.densityGcm3 * thicknessUm * CM_PER_UM;
  for (let j = 0; j < mu.length; j++) mu[j] = exp(-mu[j] * columnGcm2);
  return mu;
}

/** Transmission of a filter or surface layer (thickness must be > 0; errors name the layer). */
export function layerTransmission(layer: LayerSpec, energiesKeV: Float64Array): Float64Array {
  const where = `layer "${layer?.name}"`;
  validateThickness(layer?.thicknessUm, where, false);
  return materialTransmission(layer.material, layer.thicknessUm, energiesKeV, where);
}
