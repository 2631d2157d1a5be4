/**
 * Closure judged jointly per detector, so that many lines and regions do not fail by chance.
 * Each closure quantity at each line gives a pull z = Δ / σ_total (σ_total² = σ_line² + σ_sys², the
 * systematic part a third of the quantity's floor: the refit's own accuracy). For a release with a
 * stated false-alarm probability α (the chance that correct inputs fail the release), each of its
 * D detectors gets α/D, split evenly between two tests on the pulls of parameters the model states
 * independently of the line fits (laws, physical models; an interpolation of the lines reproduces
 * them by construction and is excluded):
 *  - χ² = Σ z² against χ²(n) with n the number of those pulls: fails when P(χ²_n ≥ χ²) < α/(2D);
 *  - the largest |z|: fails when beyond the two-sided Bonferroni bound z* = Φ⁻¹(1 − α/(4Dn)),
 *    which catches one bad line that χ² over many good ones would dilute.
 * Together they fail correct inputs with probability ≤ α (union bound; a seeded test measures it).
 * The per-line checks use the same bound z*, so no single check can fail by the 3σ lottery.
 */
import { chiSquareSurvival, normalUpperQuantile } from './chi-square.ts';
import { fmt, makeCheck } from './make-check.ts';
import type { Check } from './types.ts';

/** Default release false-alarm probability (Kiln's choice: one release in a thousand with correct inputs fails). */
export const DEFAULT_CLOSURE_FALSE_ALARM = 1e-3;

export type ClosureQuantity = 'centroid' | 'fwhm' | 'efficiency' | 'tail-fraction' | 'tail-scale' | 'shelf';

export interface ClosurePull {
  line: string;
  quantity: ClosureQuantity;
  /** Model − measurement, in `unit`. */
  residual: number;
  /** σ_total in `unit`. */
  sigma: number;
  unit: string;
  /** false when the model takes this quantity from an interpolation of the same line fits. */
  independent: boolean;
}

export interface JointSettings {
  falseAlarm: number;
  /** Detectors in the release (the release's α is shared among them). */
  detectors: number;
  /** Where α came from, for the message ("default" or the release's reason). */
  source: string;
}

export interface JointBounds {
  /** Pulls counted (independent ones). */
  n: number;
  /** Per-pull bound z*. */
  zMax: number;
  /** χ² test level. */
  chi2Level: number;
}

export function jointBounds(n: number, s: JointSettings): JointBounds {
  const perDetector = s.falseAlarm / Math.max(1, s.detectors);
  const m = Math.max(1, n);
  return { n, zMax: normalUpperQuantile(perDetector / (4 * m)), chi2Level: perDetector / 2 };
}

export interface JointResult {
  chi2: number;
  n: number;
  pValue: number;
  worst: ClosurePull | null;
  worstPull: number;
  bounds: JointBounds;
  failed: boolean;
}

export const pullOf = (p: ClosurePull) => (p.sigma > 0 ? p.residual / p.sigma : p.residual === 0 ? 0 : Infinity);

export function judgeJointly(pulls: readonly ClosurePull[], s: JointSettings): JointResult {
  const counted = pulls.filter((p) => p.independent);
  const bounds = jointBounds(counted.length, s);
  let chi2 = 0;
  let worst: ClosurePull | null = null;
  let worstPull = 0;
  for (const p of counted) {
    const z = pullOf(p);
    chi2 += z * z;
    if (Math.abs(z) > Math.abs(worstPull) || worst === null) {
      worst = p;
      worstPull = z;
    }
  }
  const pValue = counted.length ? chiSquareSurvival(chi2, counted.length) : 1;
  const failed = counted.length > 0 && (!(pValue >= bounds.chi2Level) || !(Math.abs(worstPull) <= bounds.zMax));
  return { chi2, n: counted.length, pValue, worst, worstPull, bounds, failed };
}

const signed = (z: number) => (z >= 0 ? `+${z.toFixed(1)}` : z.toFixed(1));

/** "closure.joint": one check per detector with χ², its p-value and every pull. */
export function jointClosureCheck(pulls: readonly ClosurePull[], s: JointSettings, product: string | null): Check {
  const r = judgeJointly(pulls, s);
  const byLine = new Map<string, string[]>();
  for (const p of pulls) {
    const list = byLine.get(p.line) ?? [];
    list.push(`${p.quantity} ${signed(pullOf(p))}${p.independent ? '' : ' (interpolated)'}`);
    byLine.set(p.line, list);
  }
  const pullText = [...byLine].map(([line, l]) => `${line}: ${l.join(', ')}`).join('; ');
  const head = r.n
    ? `χ² ${fmt(r.chi2)} for ${r.n} pulls (p ${fmt(r.pValue)}, fails below ${fmt(r.bounds.chi2Level)}); largest |pull| ${Math.abs(r.worstPull).toFixed(2)} at ${r.worst!.line} ${r.worst!.quantity} (fails above ${r.bounds.zMax.toFixed(2)})`
    : 'no closure quantity independent of the line fits';
  return makeCheck(r.failed ? 'fail' : 'pass', {
    id: 'closure.joint',
    title: `closure judged jointly (release false-alarm probability ${fmt(s.falseAlarm)}, ${s.source})`,
    product,
    measured: r.n ? r.pValue : null,
    tolerance: r.bounds.chi2Level,
    unit: 'p-value',
    message: `${head}. Pulls: ${pullText || 'none'}`,
  });
}
