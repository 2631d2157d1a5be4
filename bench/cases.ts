/**
 * The benchmark cases: three RMF sizes with every profile component on, the ARF, and the demo
 * site. Pure definitions; bench/case.ts runs one of them in its own process.
 */
import type { ChannelGrid, EnergyGridSpec, RedistributionSpec } from '../generators/response/model-types.ts';
import type { ResponseMeta } from '../generators/response/types.ts';

/** Energy range of every case (the demo instrument's range, keV). */
export const ENERGY_MIN_KEV = 0.2;
export const ENERGY_MAX_KEV = 12;
/** Channels span 0 to this energy for every size, so the channel width is this over the count (12, 6, 3 eV). */
export const CHANNEL_SPAN_EV = 12288;

export interface RmfCase {
  kind: 'rmf';
  name: string;
  channels: number;
  energies: number;
}

export const RMF_CASES: RmfCase[] = [
  { kind: 'rmf', name: 'rmf-1024x2048', channels: 1024, energies: 2048 },
  { kind: 'rmf', name: 'rmf-2048x4096', channels: 2048, energies: 4096 },
  { kind: 'rmf', name: 'rmf-4096x8192', channels: 4096, energies: 8192 },
];

/** The ARF uses the energy grid of the largest RMF. */
export const ARF_CASE = { kind: 'arf' as const, name: 'arf-8192', energies: 8192 };
export const SITE_CASE = { kind: 'site' as const, name: 'site-demo' };
/**
 * The generated large instrument (scripts/make-large-instrument.ts) at two sizes an order of
 * magnitude apart: detectors × 12 epochs on a 256 × 200 grid (products = detectors × 13).
 */
export const LARGE_CASE = {
  kind: 'large' as const,
  name: 'large-instrument',
  sizes: [
    { detectors: 8, epochs: 12, channels: 256, bins: 200 },
    { detectors: 80, epochs: 12, channels: 256, bins: 200 },
  ],
};

/**
 * One custom response from a release's model document (`kiln response`), the demo's 2.0.0 Tarn-F
 * on a date inside its last epoch, and the size of the generator chunk the site's response page
 * loads (from dist/, when a site was built).
 */
export const RESPONSE_CASE = { kind: 'response' as const, name: 'response-demo', release: '2.0.0', detector: 'fi0', date: '2027-03-01' };

/** Validation of a product is its own case, in its own process, reading the written file. */
export const CHECK_PREFIX = 'check-';
export const checkCaseOf = (productCase: string): string => `${CHECK_PREFIX}${productCase}`;

/** The finder and JSON index at 10,000 products (bench/finder.ts; synthetic index, no physics). */
export const FINDER_CASE = 'finder-10k';

/**
 * The demo content (archived releases, impact fits, real model sizes): a clean `kiln build`, then
 * one with nothing changed, where every job, spectral section and re-examination is cached.
 */
export const DEMO_REBUILD_CASE = 'demo-rebuild';

export const CASE_NAMES = [...RMF_CASES.map((c) => c.name), ARF_CASE.name, SITE_CASE.name, LARGE_CASE.name, DEMO_REBUILD_CASE, RESPONSE_CASE.name, FINDER_CASE];

/**
 * Profile with every component on: Gaussian core, low-energy tail, shelf, Si escape peak, Si
 * fluorescence line, event threshold. The numbers are those of the invented demo detector Tarn-F
 * (content/instruments/quillon-tarncam), copied so that edits to the demo do not move the bench.
 */
export const BENCH_SPEC: RedistributionSpec = {
  pairEnergyEv: 3.68,
  thresholdKeV: 0.1,
  fwhm: { source: 'law', readNoiseE: 3.5, fano: 0.118, sigma0Ev: 10, pixelsPerEvent: { a: 1.2, bPerKeV: 0.35 } },
  centroid: { source: 'law', gainError: 0, offsetEv: 0, chargeLossEv: 5, chargeLossScaleKeV: 0.8 },
  tail: { source: 'law', fractionAtZero: 0.08, fractionScaleKeV: 1.0, tailScaleEv: 60 },
  shelf: { source: 'law', fraction: 0.005 },
  escape: true,
  siFluorescenceFraction: 0.004,
};

/** Invented names (fictional demo mission). */
export const BENCH_META: ResponseMeta = {
  telescop: 'QUILLON',
  instrume: 'TARNCAM',
  detnam: 'BENCH',
  filter: 'NONE',
  chantype: 'PI',
  date: '2000-01-01',
};

export function energyGridOf(energies: number): EnergyGridSpec {
  return { minKeV: ENERGY_MIN_KEV, maxKeV: ENERGY_MAX_KEV, bins: energies, spacing: 'linear' };
}

export function channelGridOf(channels: number): ChannelGrid {
  return { count: channels, firstChannel: 0, widthEv: CHANNEL_SPAN_EV / channels, originEv: 0 };
}
