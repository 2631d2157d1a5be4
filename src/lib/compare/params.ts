/** Parameter changes between two releases, joined by detector, group and name. */
import type { ParameterRow } from '../../../generators/site-data/types.ts';

export interface ParameterChange {
  detector: string | null;
  group: string;
  name: string;
  unit: string;
  a: ParameterRow | null;
  b: ParameterRow | null;
  delta: number | null;
  /** Δ over the combined 1σ (quadrature), when both uncertainties are known. */
  deltaSigma: number | null;
  changed: boolean;
}

const key = (p: ParameterRow) => `${p.detector ?? ''}\u0000${p.group}\u0000${p.name}`;

export function parameterChanges(a: ParameterRow[], b: ParameterRow[]): ParameterChange[] {
  const mb = new Map(b.map((p) => [key(p), p]));
  const seen = new Set<string>();
  const out: ParameterChange[] = [];
  const push = (pa: ParameterRow | null, pb: ParameterRow | null) => {
    const p = (pa ?? pb) as ParameterRow;
    const delta = pa && pb ? pb.value - pa.value : null;
    const s = pa?.uncertainty != null && pb?.uncertainty != null ? Math.hypot(pa.uncertainty, pb.uncertainty) : null;
    out.push({
      detector: p.detector,
      group: p.group,
      name: p.name,
      unit: p.unit,
      a: pa,
      b: pb,
      delta,
      deltaSigma: delta !== null && s ? delta / s : null,
      changed: !pa || !pb || pa.value !== pb.value || pa.uncertainty !== pb.uncertainty || pa.unit !== pb.unit,
    });
  };
  for (const pa of a) {
    seen.add(key(pa));
    push(pa, mb.get(key(pa)) ?? null);
  }
  for (const pb of b) if (!seen.has(key(pb))) push(null, pb);
  return out.sort((x, y) => Number(y.changed) - Number(x.changed));
}
