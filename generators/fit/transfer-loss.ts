/**
 * Fits the transfer-loss law f(E) = f_ref·(E/E_ref)^(−α) to lines measured in several row bands.
 *
 * A line measured in bands at mean transfer counts N_b has centroids c_b = c₀·(1 − f)^N_b
 * (physics/transfer-loss.ts), so ln c_b = ln c₀ + N_b·ln(1 − f): a straight line in N_b whose
 * slope gives f at that line's energy (weighted least squares, weights (c_b/σ_b)², the
 * first-order error of ln c). Across lines, ln f = ln f_ref − α·ln(E/E_ref): a second weighted
 * straight line (α held when stated). Pure; closed-form 2-parameter fits.
 */
import { KilnInputError } from '../errors.ts';
import type { LineFit } from '../response/model-types.ts';
import { exp, expm1, log } from '../numeric/index.ts';

export interface BandLine {
  fit: LineFit;
  meanTransfers: number;
}

export interface TransferLossFit {
  lossPerTransfer: number;
  lossPerTransferErr: number;
  energyIndex: number;
  /** null when α was held at its stated value. */
  energyIndexErr: number | null;
  referenceKeV: number;
  /** Per line energy: the fitted per-transfer loss and its error. */
  perLine: { line: string; energyKeV: number; loss: number; lossErr: number }[];
}

interface Line2 {
  intercept: number;
  slope: number;
  slopeErr: number;
  interceptErr: number;
}

/** Weighted least squares y = a + b·x with weights w = 1/σ². */
function weightedLine(x: number[], y: number[], w: number[]): Line2 {
  let s = 0, sx = 0, sy = 0, sxx = 0, sxy = 0;
  for (let i = 0; i < x.length; i++) {
    s += w[i];
    sx += w[i] * x[i];
    sy += w[i] * y[i];
    sxx += w[i] * x[i] * x[i];
    sxy += w[i] * x[i] * y[i];
  }
  const d = s * sxx - sx * sx;
  return { intercept: (sxx * sy - sx * sxy) / d, slope: (s * sxy - sx * sy) / d, slopeErr: Math.sqrt(s / d), interceptErr: Math.sqrt(sxx / d) };
}

const EV_PER_KEV = 1000;

export function fitTransferLoss(lines: readonly BandLine[], opts: { referenceKeV: number; energyIndex?: number; file?: string }): TransferLossFit {
  const byLine = new Map<string, BandLine[]>();
  for (const l of lines) byLine.set(l.fit.line, [...(byLine.get(l.fit.line) ?? []), l]);
  const perLine: TransferLossFit['perLine'] = [];
  for (const [line, group] of byLine) {
    const ns = new Set(group.map((g) => g.meanTransfers));
    if (ns.size < 2) continue;
    const fit = weightedLine(
      group.map((g) => g.meanTransfers),
      group.map((g) => log(g.fit.centroidKeV)),
      group.map((g) => squared(g.fit.centroidKeV / (g.fit.centroidErrEv / EV_PER_KEV))),
    );
    const loss = -expm1(fit.slope);
    perLine.push({ line, energyKeV: group[0].fit.energyKeV, loss, lossErr: exp(fit.slope) * fit.slopeErr });
  }
  if (perLine.length === 0)
    throw new KilnInputError('no line measured in two or more row bands to fit the transfer loss to', {
      file: opts.file,
      field: 'region',
      value: `${lines.length} rows with a region`,
      expected: 'the same line label in at least two row bands',
    });
  const bad = perLine.find((p) => !(p.loss > 0));
  if (bad)
    throw new KilnInputError(`line ${bad.line} gains charge along the rows: no transfer loss can be fitted`, {
      file: opts.file,
      field: 'centroid_keV',
      value: `fitted loss per transfer ${bad.loss.toExponential(3)}`,
      expected: 'centroids that fall (or stay) with the band\'s transfer count',
    });
  perLine.sort((a, b) => a.energyKeV - b.energyKeV);
  const x = perLine.map((p) => log(p.energyKeV / opts.referenceKeV));
  const y = perLine.map((p) => log(p.loss));
  const w = perLine.map((p) => squared(p.loss / p.lossErr));
  const distinctEnergies = new Set(perLine.map((p) => p.energyKeV)).size;
  if (opts.energyIndex === undefined && distinctEnergies >= 2) {
    const f = weightedLine(x, y, w);
    const fRef = exp(f.intercept);
    return { lossPerTransfer: fRef, lossPerTransferErr: fRef * f.interceptErr, energyIndex: -f.slope, energyIndexErr: f.slopeErr, referenceKeV: opts.referenceKeV, perLine };
  }
  // α held (stated, or a single energy: α = 0): weighted mean of ln f + α·ln(E/E_ref).
  const alpha = opts.energyIndex ?? 0;
  let sw = 0, swy = 0;
  for (let i = 0; i < x.length; i++) {
    sw += w[i];
    swy += w[i] * (y[i] + alpha * x[i]);
  }
  const fRef = exp(swy / sw);
  return { lossPerTransfer: fRef, lossPerTransferErr: fRef / Math.sqrt(sw), energyIndex: alpha, energyIndexErr: null, referenceKeV: opts.referenceKeV, perLine };
}

function squared(x: number): number {
  return x * x;
}
