/**
 * Closure and cross-release helpers on matrices generated outside Kiln: Python (Debian
 * python3-scipy, installed with python3-astropy) builds channel-integrated Gaussian rows with
 * scipy.special.erf from known centroid, FWHM and detected fraction; scipy.optimize.curve_fit fits
 * the same rows as an independent reference fitter. Truth is the generating parameters.
 */
import { beforeAll, describe, expect, it } from 'vitest';
import {
  checkEfficiencyClosure,
  checkLineClosure,
  compareArf,
  compareRmf,
  fitCoreAt,
  fitRowCore,
  foldedLineEfficiency,
} from '../../generators/checks/index.ts';
import type { ArfData, RmfData } from '../../generators/response/types.ts';
import { runAstropyChecks, runPythonJson } from '../support/python.ts';

const GEN = `
import json, sys, numpy as np
from scipy.special import erf
from scipy.optimize import curve_fit
d = json.load(sys.stdin)
# FWHM = 2·sqrt(2 ln 2)·σ exactly, as Kiln has it: a rounded 2.3548 biased every FWHM by ~1e-3 eV.
FWHM_PER_SIGMA = 2 * np.sqrt(2 * np.log(2))
nchan, width = 512, 0.02
emin = np.arange(nchan) * width; emax = emin + width
lo = np.arange(1.0, 8.0, 0.05); hi = lo + 0.05
def rows(extra_fwhm_ev, frac, shift_ev):
    out = []
    for e in 0.5 * (lo + hi):
        fwhm = np.sqrt(60.0**2 + 2.0 * e * 1000) + extra_fwhm_ev
        s = fwhm / FWHM_PER_SIGMA / 1000; mu = e + shift_ev / 1000
        p = frac * 0.5 * (erf((emax - mu) / (np.sqrt(2) * s)) - erf((emin - mu) / (np.sqrt(2) * s)))
        k = np.nonzero(p > 1e-9)[0]
        out.append({'f': int(k[0]), 'm': p[k[0]:k[-1] + 1].tolist(), 'mu': mu, 'fwhm': fwhm})
    return out
def g(x, a, mu, s): return a * np.exp(-0.5 * ((x - mu) / s) ** 2)
A = rows(0.0, 0.9, 5.0)
i = 60
row = np.zeros(nchan); row[A[i]['f']:A[i]['f'] + len(A[i]['m'])] = A[i]['m']
x = 0.5 * (emin + emax)
popt, _ = curve_fit(g, x, row / width, p0=[row.max() / width, x[np.argmax(row)], 0.05])
# curve_fit sees channel integrals: remove the same Sheppard broadening (width^2/12) to compare like with like.
sig = np.sqrt(popt[2]**2 - width**2 / 12)
print(json.dumps({'emin': emin.tolist(), 'emax': emax.tolist(), 'lo': lo.tolist(), 'hi': hi.tolist(),
  'A': A, 'B': rows(10.0, 0.9, 5.0), 'refRow': i, 'scipyMuKeV': float(popt[1]), 'scipyFwhmEv': float(sig * FWHM_PER_SIGMA * 1000)}))
`;

interface Row { f: number; m: number[]; mu: number; fwhm: number }
interface Gen { emin: number[]; emax: number[]; lo: number[]; hi: number[]; A: Row[]; B: Row[]; refRow: number; scipyMuKeV: number; scipyFwhmEv: number }

/**
 * Tolerances: each is the deviation measured on these matrices (noted beside it) times 10, rounded
 * up to 1, 2 or 5 in its decade, so a change of method or constant that moves a result by more than
 * a few times its present error fails (0.5 eV before, up to 1e11 times the measured deviation).
 */
const TOL = {
  /** fitRowCore centroid vs the generating one: measured 7.1e-12 eV (rounding; the log-parabola is unbiased on these rows). */
  rowCentroidEv: 1e-10,
  /** fitRowCore FWHM vs the generating one: measured 0.018 eV (a channel-integrated Gaussian is not exactly a log-parabola). */
  rowFwhmEv: 0.2,
  /** vs scipy curve_fit's centroid: measured 8.9e-13 eV, but curve_fit stops at a relative step of 1.5e-8 (its xtol), ≈6e-5 eV at 4 keV: that bounds it. */
  scipyCentroidEv: 1e-4,
  /** vs scipy curve_fit's FWHM: measured 1.0e-3 eV (curve_fit fits channel densities as point values). */
  scipyFwhmEv: 1e-2,
  /** closure Δ of a line fit 20 eV narrower, read back: measured 20.0040 eV. */
  closureDeltaEv: 5e-2,
  /** compareRmf's ΔFWHM of the 10 eV broader cores: measured 9.99958 eV. */
  compareDeltaEv: 5e-3,
  /** fitCoreAt ΔFWHM at 3 keV of the same pair: measured 9.99805 eV. */
  coreAtDeltaEv: 2e-2,
};

function toRmf(g: Gen, rows: Row[]): RmfData {
  return {
    meta: { telescop: 'KILNSAT', instrume: 'FIXTURECAM', filter: 'NONE', chantype: 'PI', date: '2026-01-01' },
    hduclas3: 'REDIST',
    detchans: g.emin.length,
    firstChannel: 0,
    loThres: 0,
    energLoKeV: Float64Array.from(g.lo),
    energHiKeV: Float64Array.from(g.hi),
    rows: rows.map((r) => ({ fChan: Int32Array.of(r.f), nChan: Int32Array.of(r.m.length), matrix: Float32Array.from(r.m) })),
    ebounds: { firstChannel: 0, eMinKeV: Float64Array.from(g.emin), eMaxKeV: Float64Array.from(g.emax) },
  };
}

describe.runIf(runAstropyChecks)('Gaussian core, closure and comparison (scipy-generated matrices)', () => {
  let g: Gen;
  let a: RmfData;
  let b: RmfData;
  beforeAll(() => {
    g = runPythonJson<Gen>('astropy', GEN);
    a = toRmf(g, g.A);
    b = toRmf(g, g.B);
  });

  it(`fitRowCore recovers the generating centroid (±${TOL.rowCentroidEv} eV) and FWHM (±${TOL.rowFwhmEv} eV) on every row`, () => {
    for (let i = 0; i < g.A.length; i++) {
      const c = fitRowCore(a, i)!;
      expect(Math.abs(c.centroidKeV - g.A[i].mu) * 1000, `row ${i}`).toBeLessThan(TOL.rowCentroidEv);
      expect(Math.abs(c.fwhmEv - g.A[i].fwhm), `row ${i}`).toBeLessThan(TOL.rowFwhmEv);
    }
  });

  it(`agrees with scipy curve_fit on the same row (centroid ±${TOL.scipyCentroidEv} eV, FWHM ±${TOL.scipyFwhmEv} eV)`, () => {
    const c = fitRowCore(a, g.refRow)!;
    expect(Math.abs(c.centroidKeV - g.scipyMuKeV) * 1000).toBeLessThan(TOL.scipyCentroidEv);
    expect(Math.abs(c.fwhmEv - g.scipyFwhmEv)).toBeLessThan(TOL.scipyFwhmEv);
  });

  it('line closure passes for a line fit matching the generator and fails for one 20 eV narrower', () => {
    const e = 5.0;
    const core = g.A.find((r) => Math.abs(r.mu - 0.005 - e) < 0.03)!;
    const line = { line: 'Mn Kα', energyKeV: core.mu - 0.005, centroidKeV: core.mu, centroidErrEv: 1, fwhmEv: core.fwhm, fwhmErrEv: 2 };
    const ok = checkLineClosure(a, line, 'p');
    expect(ok.map((c) => c.id)).toEqual(['closure.centroid.mn-ka', 'closure.fwhm.mn-ka']);
    expect(ok.map((c) => c.status)).toEqual(['pass', 'pass']);
    const bad = checkLineClosure(a, { ...line, fwhmEv: core.fwhm - 20 }, 'p');
    expect(bad[1].status).toBe('fail');
    expect(Math.abs((bad[1].measured as number) - 20)).toBeLessThan(TOL.closureDeltaEv);
  });

  it('folded efficiency equals the generated detected fraction 0.9; closure passes at 0.9, fails at 0.8', () => {
    const eff = foldedLineEfficiency(a, 4.0);
    expect(eff).toBeGreaterThan(0.9 - 1e-4);
    expect(eff).toBeLessThan(0.9 + 1e-4);
    expect(checkEfficiencyClosure(eff, { line: 'Ti Kα', energyKeV: 4.0, efficiency: 0.9, efficiencyErr: 0.01 }, 'p')!.status).toBe('pass');
    expect(checkEfficiencyClosure(eff, { line: 'Ti Kα', energyKeV: 4.0, efficiency: 0.8, efficiencyErr: 0.01 }, 'p')!.status).toBe('fail');
    expect(checkEfficiencyClosure(eff, { line: 'Ti Kα', energyKeV: 4.0, efficiency: null, efficiencyErr: null }, 'p')).toBeNull();
  });

  it('compareRmf: identical matrices pass; 10 eV broader cores are flagged for review with Δ≈10 eV', () => {
    expect(compareRmf(a, a, 'p').every((c) => c.status === 'pass')).toBe(true);
    const diff = compareRmf(a, b, 'p', { label: 'v1 → v2' });
    const fwhm = diff.find((c) => c.id === 'review.rmf.fwhm')!;
    expect(fwhm.status).toBe('review');
    expect(Math.abs((fwhm.measured as number) - 10)).toBeLessThan(TOL.compareDeltaEv);
    expect(diff.find((c) => c.id === 'review.rmf.centroid')!.status).toBe('pass');
    expect(diff.find((c) => c.id === 'review.rmf.row-sum')!.status).toBe('pass');
    expect(Math.abs(fitCoreAt(b, 3.0)!.fwhmEv - fitCoreAt(a, 3.0)!.fwhmEv - 10)).toBeLessThan(TOL.coreAtDeltaEv);
  });

  it('compareArf: a 5 % higher area is flagged for review, a 0.1 % change passes', () => {
    const arf: ArfData = { meta: a.meta, energLoKeV: a.energLoKeV, energHiKeV: a.energHiKeV, specrespCm2: a.energLoKeV.map((e) => 100 + 10 * e) };
    const up5 = { ...arf, specrespCm2: arf.specrespCm2.map((v) => v * 1.05) };
    const up01 = { ...arf, specrespCm2: arf.specrespCm2.map((v) => v * 1.001) };
    const r5 = compareArf(arf, up5, 'p')[0];
    expect(r5.id).toBe('review.arf.area-ratio');
    expect(r5.status).toBe('review');
    // A uniform 5 % change is one value, not a degenerate range "1.05–1.05".
    expect(r5.measured).toBe('1.05');
    expect(r5.message).toMatch(/^area ratio 1\.05 at every compared energy .*allowed 1 ± 0\.02\)$/);
    expect(compareArf(arf, up01, 'p')[0].status).toBe('pass');
  });
});
