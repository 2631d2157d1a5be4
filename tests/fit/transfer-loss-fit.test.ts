/**
 * The transfer-loss fit (generators/fit/transfer-loss.ts) against weighted linear least squares
 * done by Debian's python3-numpy: per line, ln c_b = ln c₀ + N_b·ln(1 − f) fitted with weights
 * (c_b/σ_b)² (numpy.linalg.lstsq, covariance inv(AᵀWA)); then ln f = ln f_ref − α·ln(E/E_ref)
 * across lines with weights (f/σ_f)². Errors propagate to first order (d(1 − e^b)/db = −e^b and
 * d(e^a)/da = e^a: exact derivatives). Centroids carry seeded noise so every weight matters.
 */
import { describe, expect, it } from 'vitest';
import { execFileSync } from 'node:child_process';
import { fitTransferLoss, type BandLine } from '../../generators/fit/transfer-loss.ts';
import { KilnInputError } from '../../generators/errors.ts';
import { requirePython } from '../support/python.ts';
import { normalSampler } from './rng.ts';

const F_REF = 4e-6;
const ALPHA = 0.4;
const REF_KEV = 5.895;
const LINES = [
  ['Mn Ka', 5.895],
  ['Al Ka', 1.4867],
  ['Ti Ka', 4.5089],
] as const;
const BANDS = [127.5, 383.5, 639.5, 895.5];

function bandLine(line: string, energyKeV: number, meanTransfers: number, centroidKeV: number, centroidErrEv: number): BandLine {
  return {
    fit: { line, energyKeV, centroidKeV, centroidErrEv, fwhmEv: 100, fwhmErrEv: 1, tailFraction: 0, tailFractionErr: 0.01, tailScaleEv: 50, shelfFraction: 0, efficiency: null, efficiencyErr: null },
    meanTransfers,
  };
}

/** Centroids c₀·(1 − f(E))^N with seeded noise and errors that differ per band. */
function noisy(seed: number): BandLine[] {
  const noise = normalSampler(seed);
  return LINES.flatMap(([line, e]) =>
    BANDS.map((n, b) => {
      const f = F_REF * (e / REF_KEV) ** -ALPHA;
      const errEv = 0.3 + 0.15 * b;
      return bandLine(line, e, n, e * (1 - f) ** n + (errEv / 1000) * noise(), errEv);
    }),
  );
}

interface Ref {
  perLine: { line: string; loss: number; lossErr: number }[];
  fRef: number;
  fRefErr: number;
  alpha: number;
  alphaErr: number;
  heldFRef: number;
  heldFRefErr: number;
}

/** The two stages by numpy (lstsq for the line, inv(AᵀWA) for its covariance). */
function numpyReference(rows: BandLine[], heldAlpha: number): Ref {
  const py = requirePython('scipy');
  const script = `
import sys, json, numpy as np
d = json.load(sys.stdin)
def wline(x, y, w):
    A = np.stack([np.ones_like(x), x], 1) * np.sqrt(w)[:, None]
    b = np.linalg.lstsq(A, y * np.sqrt(w), rcond=None)[0]
    cov = np.linalg.inv(A.T @ A)
    return b, cov
per = []
for name in sorted(set(r["line"] for r in d["rows"]), key=lambda n: [r["e"] for r in d["rows"] if r["line"] == n][0]):
    g = [r for r in d["rows"] if r["line"] == name]
    n = np.array([r["n"] for r in g]); c = np.array([r["c"] for r in g]); s = np.array([r["s"] for r in g]) / 1000
    b, cov = wline(n, np.log(c), (c / s) ** 2)
    per.append({"line": name, "e": g[0]["e"], "loss": float(-np.expm1(b[1])), "lossErr": float(np.exp(b[1]) * np.sqrt(cov[1, 1]))})
x = np.log(np.array([p["e"] for p in per]) / d["ref"]); y = np.log([p["loss"] for p in per])
w = (np.array([p["loss"] for p in per]) / np.array([p["lossErr"] for p in per])) ** 2
b, cov = wline(x, y, w)
held = np.sum(w * (y + d["alpha"] * x)) / np.sum(w)
print(json.dumps({"perLine": per, "fRef": float(np.exp(b[0])), "fRefErr": float(np.exp(b[0]) * np.sqrt(cov[0, 0])),
  "alpha": float(-b[1]), "alphaErr": float(np.sqrt(cov[1, 1])), "heldFRef": float(np.exp(held)), "heldFRefErr": float(np.exp(held) / np.sqrt(np.sum(w)))}))`;
  const input = { ref: REF_KEV, alpha: heldAlpha, rows: rows.map((r) => ({ line: r.fit.line, e: r.fit.energyKeV, n: r.meanTransfers, c: r.fit.centroidKeV, s: r.fit.centroidErrEv })) };
  return JSON.parse(execFileSync(py, ['-c', script], { input: JSON.stringify(input) }).toString());
}

const rel = (a: number, b: number) => Math.abs(a / b - 1);

describe('transfer-loss fit against numpy (weighted straight lines, two stages)', () => {
  const rows = noisy(151515);
  const ref = numpyReference(rows, 0.25);

  it('per line: loss −expm1(slope) and its error e^slope·σ_slope, lines in order of energy', () => {
    const r = fitTransferLoss(rows, { referenceKeV: REF_KEV });
    expect(r.perLine.map((p) => p.line)).toEqual(['Al Ka', 'Ti Ka', 'Mn Ka']);
    expect(r.perLine.map((p) => p.energyKeV)).toEqual([1.4867, 4.5089, 5.895]);
    r.perLine.forEach((p, i) => {
      expect(rel(p.loss, ref.perLine[i].loss), `${p.line} loss`).toBeLessThan(1e-6);
      expect(rel(p.lossErr, ref.perLine[i].lossErr), `${p.line} error`).toBeLessThan(1e-6);
    });
  });

  it('across lines: f_ref = e^intercept, α = −slope, with their errors', () => {
    const r = fitTransferLoss(rows, { referenceKeV: REF_KEV });
    expect(rel(r.lossPerTransfer, ref.fRef)).toBeLessThan(1e-6);
    expect(rel(r.lossPerTransferErr, ref.fRefErr)).toBeLessThan(1e-6);
    expect(rel(r.energyIndex, ref.alpha)).toBeLessThan(1e-6);
    expect(rel(r.energyIndexErr as number, ref.alphaErr)).toBeLessThan(1e-6);
    expect(r.referenceKeV).toBe(REF_KEV);
    // the seeded data scatter about the truth by their errors (4σ)
    expect(Math.abs(r.energyIndex - ALPHA)).toBeLessThan(4 * (r.energyIndexErr as number));
  });

  it('α held: f_ref is the weighted mean of ln f + α·ln(E/E_ref), error f_ref/√Σw', () => {
    const r = fitTransferLoss(rows, { referenceKeV: REF_KEV, energyIndex: 0.25 });
    expect(r.energyIndex).toBe(0.25);
    expect(r.energyIndexErr).toBeNull();
    expect(rel(r.lossPerTransfer, ref.heldFRef)).toBeLessThan(1e-6);
    expect(rel(r.lossPerTransferErr, ref.heldFRefErr)).toBeLessThan(1e-6);
  });

  it('one line energy: α = 0 held, f_ref = that line’s loss (a weighted mean of one value)', () => {
    const one = rows.filter((x) => x.fit.line === 'Ti Ka');
    const r = fitTransferLoss(one, { referenceKeV: REF_KEV });
    expect(r.energyIndex).toBe(0);
    expect(r.energyIndexErr).toBeNull();
    expect(rel(r.lossPerTransfer, ref.perLine[1].loss)).toBeLessThan(1e-12);
    expect(rel(r.lossPerTransferErr, ref.perLine[1].lossErr)).toBeLessThan(1e-6);
  });

  it('a line seen in one band only is left out of the fit, not an error while others span bands', () => {
    const extra = [...rows, bandLine('Cu Ka', 8.048, 127.5, 8.0, 0.4)];
    const r = fitTransferLoss(extra, { referenceKeV: REF_KEV });
    expect(r.perLine.map((p) => p.line)).toEqual(['Al Ka', 'Ti Ka', 'Mn Ka']);
    expect(rel(r.lossPerTransfer, ref.fRef)).toBeLessThan(1e-6);
  });
});

describe('transfer-loss fit, the fewest measurements (exact two-point lines)', () => {
  it('a line in exactly two bands: slope = Δln c/ΔN, loss = −expm1(slope)', () => {
    const two = [bandLine('Mn Ka', 5.895, 100, 5.89, 0.4), bandLine('Mn Ka', 5.895, 900, 5.87, 0.4)];
    const r = fitTransferLoss(two, { referenceKeV: REF_KEV });
    const slope = (Math.log(5.87) - Math.log(5.89)) / 800;
    expect(rel(r.perLine[0].loss, -Math.expm1(slope))).toBeLessThan(1e-9);
    expect(rel(r.lossPerTransfer, -Math.expm1(slope))).toBeLessThan(1e-9);
  });

  it('exactly two line energies: α = −Δln f/Δln E through the two per-line losses', () => {
    const rows = noisy(3).filter((x) => x.fit.line !== 'Ti Ka');
    const r = fitTransferLoss(rows, { referenceKeV: REF_KEV });
    const [lo, hi] = r.perLine;
    expect(r.energyIndexErr).not.toBeNull();
    expect(rel(r.energyIndex, -(Math.log(hi.loss) - Math.log(lo.loss)) / (Math.log(hi.energyKeV) - Math.log(lo.energyKeV)))).toBeLessThan(1e-9);
  });
});

describe('transfer-loss fit, bad input', () => {
  it('a line whose centroid does not change with the transfer count (zero loss, no power law through it) is refused', () => {
    const flat = BANDS.map((n) => bandLine('Mn Ka', 5.895, n, 5.895, 0.4));
    expect(() => fitTransferLoss(flat, { referenceKeV: REF_KEV })).toThrow(KilnInputError);
    // exactly zero: ln 1 = 0 and weights (1 keV / 0.5 keV)² = 4 make every sum exact, so the slope is 0
    const zero = [100, 900].map((n) => bandLine('Mn Ka', 5.895, n, 1, 500));
    expect(() => fitTransferLoss(zero, { referenceKeV: REF_KEV })).toThrow(/gains charge along the rows/);
  });

  it('a line whose centroid grows with the transfer count: named, with the fitted loss', () => {
    const rising = BANDS.map((n) => bandLine('Mn Ka', 5.895, n, 5.895 * (1 + 1e-6) ** n, 0.4));
    try {
      fitTransferLoss(rising, { referenceKeV: REF_KEV, file: 'lines.csv' });
      expect.unreachable();
    } catch (e) {
      expect(e).toBeInstanceOf(KilnInputError);
      const err = e as KilnInputError;
      // loss = −expm1(ln(1 + 1e-6)) = −1e-6 (exact mathematics; 4 digits shown)
      expect(err.oneLine()).toBe(
        "lines.csv: centroid_keV: line Mn Ka gains charge along the rows: no transfer loss can be fitted (got \"fitted loss per transfer -1.000e-6\"; expected centroids that fall (or stay) with the band's transfer count)",
      );
    }
  });

  it('no line in two bands: names the region column, the row count and what is expected', () => {
    try {
      fitTransferLoss([bandLine('Mn Ka', 5.895, 127.5, 5.89, 0.4), bandLine('Al Ka', 1.4867, 383.5, 1.48, 0.4)], { referenceKeV: REF_KEV, file: 'lines.csv' });
      expect.unreachable();
    } catch (e) {
      expect((e as KilnInputError).oneLine()).toBe(
        'lines.csv: region: no line measured in two or more row bands to fit the transfer loss to (got "2 rows with a region"; expected the same line label in at least two row bands)',
      );
    }
  });
});
