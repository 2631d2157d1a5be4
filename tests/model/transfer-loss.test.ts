/**
 * Charge lost in transfer (generators/physics/transfer-loss.ts), its effect on the matrix and the
 * fit of the law to lines measured in row bands.
 * Source of the law: charge after N transfers Q₀(1 − f)^N (Janesick, "Scientific Charge-Coupled
 * Devices", SPIE Press 2001, from memory), checked here against a
 * hand computation: N multiplications by (1 − f), no library function.
 */
import { describe, expect, it } from 'vitest';
import { lostFraction, transferShiftKeV, transferVarianceKeV2, lossPerTransferAt } from '../../generators/physics/transfer-loss.ts';
import { buildRedistribution } from '../../generators/response/redistribution.ts';
import { fitTransferLoss } from '../../generators/fit/transfer-loss.ts';
import type { RedistributionSpec } from '../../generators/response/model-types.ts';
import { KilnInputError } from '../../generators/errors.ts';

/** Charge kept after n transfers by repeated multiplication (the hand computation). */
function keptByHand(f: number, n: number): number {
  let q = 1;
  for (let i = 0; i < n; i++) q *= 1 - f;
  return q;
}

const law = (f: number, alpha = 0, ref = 5.895) => ({ lossPerTransfer: f, energyIndex: alpha, referenceKeV: ref });

describe('transfer loss: centroid shift E·(1 − (1 − f)^N)', () => {
  it.each([
    [5.895, 1e-5, 500],
    [1.4867, 3e-6, 1023],
    [0.5249, 2e-4, 37],
  ])('E = %f keV, f = %f, N = %i equals the hand computation', (e, f, n) => {
    const byHand = e * (1 - keptByHand(f, n));
    expect(transferShiftKeV(law(f), e, e, n)).toBeCloseTo(byHand, 12);
    // N multiplications round by up to N·2^-53 relative: 12 digits.
    expect(lostFraction(f, n)).toBeCloseTo(1 - keptByHand(f, n), 12);
  });

  it('is ≈ E·N·f when N·f ≪ 1 (first order of the binomial expansion (1 − f)^N ≈ 1 − N·f: mathematics)', () => {
    const e = 5.895;
    const shift = transferShiftKeV(law(2e-6), e, e, 300);
    // second-order term E·(N f)²/2 ≈ 1e-6 keV: relative 3e-4
    expect(shift / (e * 300 * 2e-6)).toBeCloseTo(1, 3);
  });

  it('falls as a power of E: f(E) = f_ref (E/E_ref)^(−α) (common practice, no source)', () => {
    expect(lossPerTransferAt(law(4e-6, 0.4), 5.895)).toBeCloseTo(4e-6, 18);
    // by hand (calculator): (1.4867/5.895)^(−0.4) = 3.96516^0.4 = 1.73502
    expect(lossPerTransferAt(law(4e-6, 0.4), 1.4867) / 4e-6).toBeCloseTo(1.73502, 4);
  });

  it('adds the binomial variance of the lost electrons and the uniform spread over the band', () => {
    const e = 5.895;
    const f = 1e-5;
    const w = 3.68;
    const band = { firstTransfer: 100, lastTransfer: 300 };
    const p = 1 - keptByHand(f, 200);
    const binomial = (w / 1000) * e * p * (1 - p); // (w/1000)² · (E·1000/w) · p(1−p)
    const spread = e * (keptByHand(f, 100) - keptByHand(f, 300));
    expect(transferVarianceKeV2(law(f), e, e, band, w)).toBeCloseTo(binomial + (spread * spread) / 12, 12);
  });
});

const simpleSpec = (): RedistributionSpec => ({
  pairEnergyEv: 3.68,
  thresholdKeV: 0.1,
  fwhm: { source: 'law', readNoiseE: 3, fano: 0.118, sigma0Ev: 0, pixelsPerEvent: { a: 1, bPerKeV: 0 } },
  centroid: { source: 'law', gainError: 0, offsetEv: 0, chargeLossEv: 0, chargeLossScaleKeV: 1 },
  tail: { source: 'law', fractionAtZero: 0, fractionScaleKeV: 1, tailScaleEv: 50 },
  shelf: { source: 'law', fraction: 0 },
  escape: false,
  siFluorescenceFraction: 0,
});

/** Mean channel energy of a matrix row (channels of width w from 0). */
function rowMeanKeV(row: { fChan: Int32Array; nChan: Int32Array; matrix: Float32Array }, widthKeV: number): number {
  let s = 0;
  let m = 0;
  let k = 0;
  for (let g = 0; g < row.fChan.length; g++)
    for (let c = 0; c < row.nChan[g]; c++, k++) {
      s += row.matrix[k];
      m += row.matrix[k] * (row.fChan[g] + c + 0.5) * widthKeV;
    }
  return m / s;
}

describe('transfer loss in the matrix', () => {
  it('moves a Gaussian line by the hand-computed shift at the band mean, to 0.05 eV', () => {
    const e = 5.895;
    const f = 1e-5;
    const bins = { loKeV: Float64Array.of(e - 1e-6), hiKeV: Float64Array.of(e + 1e-6) };
    const channels = { count: 4096, firstChannel: 0, widthEv: 2.5, originEv: 0 };
    const meta = { telescop: 'T', instrume: 'I', filter: 'NONE', chantype: 'PI' as const, date: '2027-01-01' };
    const plain = buildRedistribution({ spec: simpleSpec(), lineFits: [], energy: bins, channels, meta });
    const moved = buildRedistribution({ spec: simpleSpec(), lineFits: [], energy: bins, channels, meta, transferLoss: { law: law(f), band: { firstTransfer: 400, lastTransfer: 600 } } });
    const shiftEv = (rowMeanKeV(plain.rmf.rows[0], 0.0025) - rowMeanKeV(moved.rmf.rows[0], 0.0025)) * 1000;
    expect(shiftEv).toBeCloseTo(e * (1 - keptByHand(f, 500)) * 1000, 1);
  });
});

describe('fitting the law to lines in row bands', () => {
  const truth = law(4e-6, 0.4);
  const bands = [127.5, 383.5, 639.5, 895.5];
  const lines = [
    ['Al Ka', 1.4867],
    ['Ti Ka', 4.5089],
    ['Mn Ka', 5.895],
  ] as const;
  const fits = lines.flatMap(([line, e]) =>
    bands.map((n) => ({
      fit: {
        line,
        energyKeV: e,
        centroidKeV: e * keptByHand(lossPerTransferAt(truth, e), Math.round(n)) * Math.pow(1 - lossPerTransferAt(truth, e), n - Math.round(n)),
        centroidErrEv: 0.4,
        fwhmEv: 100,
        fwhmErrEv: 1,
        tailFraction: 0,
        tailFractionErr: 0.01,
        tailScaleEv: 50,
        shelfFraction: 0,
        efficiency: null,
        efficiencyErr: null,
      },
      meanTransfers: n,
    })),
  );

  it('recovers f_ref and α from noise-free centroids', () => {
    const r = fitTransferLoss(fits, { referenceKeV: 5.895 });
    expect(r.lossPerTransfer).toBeCloseTo(4e-6, 10);
    expect(r.energyIndex).toBeCloseTo(0.4, 6);
    expect(r.energyIndexErr).not.toBeNull();
  });

  it('holds a stated α', () => {
    const r = fitTransferLoss(fits, { referenceKeV: 5.895, energyIndex: 0.4 });
    expect(r.energyIndex).toBe(0.4);
    expect(r.lossPerTransfer).toBeCloseTo(4e-6, 10);
  });

  it('refuses lines measured in one band only, naming the region column', () => {
    try {
      fitTransferLoss(fits.filter((x) => x.meanTransfers === 127.5), { referenceKeV: 5.895 });
      expect.unreachable();
    } catch (e) {
      expect(e).toBeInstanceOf(KilnInputError);
      expect((e as KilnInputError).where.field).toBe('region');
    }
  });
});
