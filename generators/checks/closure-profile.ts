/**
 * Closure of the profile parameters a line fit measures besides centroid and width: tail
 * fraction, tail scale and shelf, from a refit of the matrix row at the line (profile-refit.ts)
 * against the line fit, with tolerances from the line-fit errors: |Δ| ≤ z*·σ_total (σ_total =
 * the line's 1σ and floor/3 in quadrature; z* the joint closure's per-pull bound). The tail scale
 * is judged where the line states its error and its tail is significant (fraction > 3σ); the
 * shelf where the line states its error. Ids: closure.tail-fraction.<line>, closure.tail-scale.<line>,
 * closure.shelf.<line>.
 */
import type { LineFit } from '../response/model-types.ts';
import type { RmfData } from '../response/types.ts';
import { closureSigma, slug } from './closure.ts';
import type { ClosurePull, ClosureQuantity } from './closure-joint.ts';
import { fmt, makeCheck } from './make-check.ts';
import { refitProfileAt, type ProfileRefit, type RefitContext } from './profile-refit.ts';
import type { Check } from './types.ts';

/** The refit's own accuracy (3σ), Kiln's choice from the refit of known rows (tests/checks/profile-refit.test.ts). */
export const PROFILE_FLOORS = { tailFraction: 0.002, tailScaleEv: 3, shelfFraction: 0.001 };
/** A tail is significant when its fraction exceeds this many σ. */
const SIGNIFICANT_SIGMAS = 3;

export interface ProfileClosureInput {
  rmf: RmfData;
  line: LineFit;
  ctx: Omit<RefitContext, 'start'>;
  product: string | null;
  /** Per-pull bound z*. */
  zMax: number;
  independent: { tail: boolean; shelf: boolean };
}

/** Which profile quantities a line can be judged on (the same list the pulls will have). */
export function profileQuantitiesOf(line: LineFit): ClosureQuantity[] {
  const q: ClosureQuantity[] = ['tail-fraction'];
  if (typeof line.tailScaleErrEv === 'number' && line.tailFraction > SIGNIFICANT_SIGMAS * line.tailFractionErr) q.push('tail-scale');
  if (typeof line.shelfFractionErr === 'number') q.push('shelf');
  return q;
}

/** `refit` is what the checks compared (null when the row could not be refitted); the site plots it at the line. */
export function checkProfileClosure(inp: ProfileClosureInput): { checks: Check[]; pulls: ClosurePull[]; refit: ProfileRefit | null } {
  const { rmf, line, product, zMax } = inp;
  const s = slug(line.line);
  const quantities = profileQuantitiesOf(line);
  const refit = refitProfileAt(rmf, line.energyKeV, {
    ...inp.ctx,
    start: { tailFraction: line.tailFraction, tailScaleEv: line.tailScaleEv, shelfFraction: line.shelfFraction },
  });
  if (!refit) {
    const msg = `the matrix row near ${fmt(line.energyKeV)} keV could not be refitted with core, tail and shelf`;
    return { checks: quantities.map((q) => makeCheck('fail', { id: `closure.${q}.${s}`, title: `${q} closure at ${line.line}`, product, message: msg })), pulls: [], refit: null };
  }
  const spec: Record<string, { model: number; measured: number; err: number | null | undefined; floor: number; unit: string; independent: boolean; digits: (x: number) => string }> = {
    'tail-fraction': { model: refit.tailFraction, measured: line.tailFraction, err: line.tailFractionErr, floor: PROFILE_FLOORS.tailFraction, unit: 'fraction', independent: inp.independent.tail, digits: fmt },
    'tail-scale': { model: refit.tailScaleEv, measured: line.tailScaleEv, err: line.tailScaleErrEv, floor: PROFILE_FLOORS.tailScaleEv, unit: 'eV', independent: inp.independent.tail, digits: fmt },
    shelf: { model: refit.shelfFraction, measured: line.shelfFraction, err: line.shelfFractionErr, floor: PROFILE_FLOORS.shelfFraction, unit: 'fraction', independent: inp.independent.shelf, digits: fmt },
  };
  const checks: Check[] = [];
  const pulls: ClosurePull[] = [];
  for (const q of quantities) {
    const v = spec[q];
    const d = v.model - v.measured;
    const sigma = closureSigma(v.err, v.floor);
    const tol = zMax * sigma;
    pulls.push({ line: line.line, quantity: q, residual: d, sigma, unit: v.unit, independent: v.independent });
    checks.push(
      makeCheck(Number.isFinite(d) && Math.abs(d) <= tol ? 'pass' : 'fail', {
        id: `closure.${q}.${s}`,
        title: `${q} closure at ${line.line} (${fmt(line.energyKeV)} keV)`,
        product,
        measured: d,
        tolerance: tol,
        unit: v.unit,
        message: `matrix row refitted: ${v.digits(v.model)} vs line fit ${v.digits(v.measured)} ± ${fmt(v.err ?? 0)} (Δ ${fmt(d)}, pull ${(d / sigma).toFixed(2)}, allowed ±${fmt(tol)})`,
      }),
    );
  }
  return { checks, pulls, refit };
}
