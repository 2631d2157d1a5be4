/** Differences of the published parameter tables of two releases (pure). */
import type { ParameterRow } from '../site-data/types.ts';

export interface ParameterDiff {
  detector: string | null;
  group: string;
  name: string;
  unit: string;
  a: number | null;
  b: number | null;
  /** b − a, null when either side lacks the parameter. */
  diff: number | null;
  /** |b − a| in units of the combined 1σ, when both have uncertainties. */
  sigmas: number | null;
}

const key = (p: ParameterRow) => `${p.detector ?? ''}\u0000${p.group}\u0000${p.name}`;

export function parameterDiffs(a: readonly ParameterRow[], b: readonly ParameterRow[]): ParameterDiff[] {
  const ma = new Map(a.map((p) => [key(p), p]));
  const mb = new Map(b.map((p) => [key(p), p]));
  const keys = [...new Set([...ma.keys(), ...mb.keys()])];
  const out: ParameterDiff[] = [];
  for (const k of keys) {
    const pa = ma.get(k);
    const pb = mb.get(k);
    const p = (pa ?? pb)!;
    const diff = pa && pb ? pb.value - pa.value : null;
    if (diff === 0) continue;
    const ua = pa?.uncertainty ?? null;
    const ub = pb?.uncertainty ?? null;
    const sigma = ua !== null && ub !== null ? Math.sqrt(ua * ua + ub * ub) : null;
    out.push({
      detector: p.detector,
      group: p.group,
      name: p.name,
      unit: p.unit,
      a: pa ? pa.value : null,
      b: pb ? pb.value : null,
      diff,
      sigmas: diff !== null && sigma ? Math.abs(diff) / sigma : null,
    });
  }
  return out;
}
