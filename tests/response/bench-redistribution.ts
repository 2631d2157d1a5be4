/**
 * Timing of a 4096-channel × 8192-energy matrix with every profile component (not a test).
 * Run: npx tsx tests/response/bench-redistribution.ts
 * Silicon atomic data here are round illustrative numbers (a μ ∝ E^-2.7 power law with a K-edge
 * jump), enough for timing; the tests use xraylib's values.
 */
import { buildRedistribution } from '../../generators/response/redistribution.ts';
import type { RedistributionSpec } from '../../generators/response/model-types.ts';

const spec: RedistributionSpec = {
  pairEnergyEv: 3.65,
  thresholdKeV: 0.1,
  fwhm: { source: 'law', readNoiseE: 4, fano: 0.118, sigma0Ev: 5, pixelsPerEvent: { a: 1.5, bPerKeV: 0.3 } },
  centroid: { source: 'law', gainError: 0.002, offsetEv: 3, chargeLossEv: 25, chargeLossScaleKeV: 0.6 },
  tail: { source: 'law', fractionAtZero: 0.15, fractionScaleKeV: 1.5, tailScaleEv: 40 },
  shelf: { source: 'law', fraction: 0.01 },
  escape: true,
  siFluorescenceFraction: 0.002,
};
const silicon = {
  fluorescenceYield: 0.05,
  jumpRatio: 10,
  kEdgeKeV: 1.839,
  kAlphaKeV: 1.74,
  attenuation: (e: number) => (e > 1.839 ? 3200 : 320) * Math.pow(e / 1.839, -2.7),
};
const t0 = performance.now();
const r = buildRedistribution({
  spec,
  lineFits: [],
  energy: { minKeV: 0.1, maxKeV: 12, bins: 8192, spacing: 'linear' },
  channels: { count: 4096, firstChannel: 0, widthEv: 3, originEv: 0 },
  meta: { telescop: 'DEMO', instrume: 'DEMO', filter: 'NONE', chantype: 'PI', date: '2000-01-01' },
  silicon,
});
const t1 = performance.now();
let worst = 0;
let maxDrop = 0;
for (let i = 0; i < r.rmf.rows.length; i++) {
  let s = 0;
  for (const v of r.rmf.rows[i].matrix) s += v;
  s += r.losses.thresholdLoss[i] + r.losses.outsideLoss[i] + r.losses.droppedByCut[i];
  worst = Math.max(worst, Math.abs(s - 1));
  maxDrop = Math.max(maxDrop, r.losses.droppedByCut[i]);
}
console.log(`build ${((t1 - t0) / 1000).toFixed(2)} s, nnz ${r.nnz}, max |sum+losses−1| ${worst.toExponential(2)}, max dropped ${maxDrop.toExponential(2)}`);
