/**
 * Source components: photon flux densities N(E) in photons cm⁻² s⁻¹ keV⁻¹, energies in keV.
 * Each continuum is a pure function of E; a line is integrated over a bin in closed form.
 * Normalisations are Kiln's own choices, stated per component.
 */
import { erf } from '../physics/special.ts';
import { exp, expm1, log, pow } from '../numeric/index.ts';

/** ζ(3), Apéry's constant: ∫₀^∞ x²/(eˣ − 1) dx = 2ζ(3). */
const ZETA3 = 1.2020569031595942;
/** Below this E/kT, eˣ − 1 is computed as expm1 anyway; above it the photon density underflows. */
const MAX_EXPONENT = 700;

export interface PowerLaw {
  kind: 'power-law';
  name: string;
  /** Γ in N(E) = K (E / 1 keV)^−Γ. */
  photonIndex: number;
  /** K, photons cm⁻² s⁻¹ keV⁻¹ at 1 keV. */
  normAt1KeV: number;
}

/** Planck photon spectrum normalised to its photon flux over all energies. */
export interface Blackbody {
  kind: 'blackbody';
  name: string;
  kTKeV: number;
  /** Photons cm⁻² s⁻¹ over all energies. */
  photonFluxCm2s: number;
}

/**
 * Thermal bremsstrahlung continuum N(E) = K (1 keV / E) exp(−(E − 1 keV)/kT), normalised at 1 keV;
 * Gaunt factor taken as 1 (a simplification: the real factor varies slowly with E/kT).
 */
export interface Bremsstrahlung {
  kind: 'bremsstrahlung';
  name: string;
  kTKeV: number;
  normAt1KeV: number;
}

export interface GaussianLine {
  kind: 'gaussian-line';
  name: string;
  energyKeV: number;
  sigmaKeV: number;
  /** Photons cm⁻² s⁻¹ in the line. */
  photonFluxCm2s: number;
}

export type Continuum = PowerLaw | Blackbody | Bremsstrahlung;
export type Component = Continuum | GaussianLine;
export type ComponentKind = Component['kind'];

/** Photon flux density of a continuum at E, photons cm⁻² s⁻¹ keV⁻¹. */
export function continuumDensity(c: Continuum, energyKeV: number): number {
  switch (c.kind) {
    case 'power-law':
      return c.normAt1KeV * pow(energyKeV, -c.photonIndex);
    case 'blackbody': {
      const x = energyKeV / c.kTKeV;
      if (x > MAX_EXPONENT) return 0;
      return (c.photonFluxCm2s * energyKeV * energyKeV) / (2 * ZETA3 * c.kTKeV * c.kTKeV * c.kTKeV * expm1(x));
    }
    case 'bremsstrahlung': {
      const x = (energyKeV - 1) / c.kTKeV;
      if (x > MAX_EXPONENT) return 0;
      return (c.normAt1KeV / energyKeV) * exp(-x);
    }
  }
}

/** Photons cm⁻² s⁻¹ of a Gaussian line between loKeV and hiKeV (erf differences; σ = 0 is a δ line in [lo, hi)). */
export function lineFluxInBin(l: GaussianLine, loKeV: number, hiKeV: number): number {
  if (l.sigmaKeV === 0) return l.energyKeV >= loKeV && l.energyKeV < hiKeV ? l.photonFluxCm2s : 0;
  const s = l.sigmaKeV * Math.SQRT2;
  return 0.5 * l.photonFluxCm2s * (erf((hiKeV - l.energyKeV) / s) - erf((loKeV - l.energyKeV) / s));
}

/** Photons cm⁻² s⁻¹ of a power law between lo and hi, in closed form (for stated band fluxes). */
export function powerLawPhotonFlux(photonIndex: number, normAt1KeV: number, loKeV: number, hiKeV: number): number {
  const a = 1 - photonIndex;
  if (Math.abs(a) < 1e-12) return normAt1KeV * log(hiKeV / loKeV);
  return (normAt1KeV * (pow(hiKeV, a) - pow(loKeV, a))) / a;
}
