/**
 * Thinning of plotted curves for site documents: the points a polyline through the kept points
 * needs to stay within `tolerance` (vertically) of every dropped one (Ramer–Douglas–Peucker), in plot
 * coordinates normalised to the curve's own span (x on a log axis; y linear or log), so steps at
 * absorption edges survive while smooth stretches shrink to a few points. Pure, browser-safe.
 */
import { log } from '../numeric/index.ts';

export interface ThinOptions {
  /** Largest deviation of a dropped point from the drawn line, as a fraction of the plot's span. */
  tolerance: number;
  /** y on a log axis (positive values only; others are kept as they are). */
  yLog?: boolean;
}

/** Indices to keep so that every series in `ys` (aligned with `x`, x > 0 ascending) draws the same within the tolerance. */
export function thinIndices(x: readonly number[], ys: readonly (readonly number[])[], opts: ThinOptions): number[] {
  const n = x.length;
  if (n <= 2) return [...Array(n).keys()];
  const keep = new Uint8Array(n);
  keep[0] = keep[n - 1] = 1;
  const lx = x.map((v) => log(v));
  const xSpan = lx[n - 1] - lx[0] || 1;
  const px = lx.map((v) => (v - lx[0]) / xSpan);
  for (const y of ys) {
    const ty = y.map((v) => (opts.yLog ? (v > 0 ? log(v) : NaN) : v));
    // Non-finite values break the line: keep them and their neighbours, thin each finite run alone.
    const finite = ty.filter(Number.isFinite);
    const span = finite.length ? Math.max(...finite) - Math.min(...finite) || 1 : 1;
    const py = ty.map((v) => v / span);
    let start = -1;
    for (let i = 0; i <= n; i++) {
      const ok = i < n && Number.isFinite(py[i]);
      if (ok && start < 0) start = i;
      if (!ok) {
        if (i < n) keep[i] = 1;
        if (start >= 0) rdp(px, py, start, i - 1, opts.tolerance, keep);
        start = -1;
      }
    }
  }
  const out: number[] = [];
  for (let i = 0; i < n; i++) if (keep[i]) out.push(i);
  return out;
}

function rdp(px: readonly number[], py: readonly number[], a0: number, b0: number, tol: number, keep: Uint8Array): void {
  keep[a0] = keep[b0] = 1;
  const stack: [number, number][] = [[a0, b0]];
  const tol2 = tol * tol;
  while (stack.length) {
    const [a, b] = stack.pop()!;
    const dx = px[b] - px[a];
    const slope = dx > 0 ? (py[b] - py[a]) / dx : 0;
    let worst = -1;
    let worstD = tol2;
    for (let i = a + 1; i < b; i++) {
      // Vertical distance: what a reader of a value off the drawn line would be wrong by.
      const r = py[i] - py[a] - slope * (px[i] - px[a]);
      const d = r * r;
      if (d > worstD) ((worstD = d), (worst = i));
    }
    if (worst > 0) {
      keep[worst] = 1;
      stack.push([a, worst], [worst, b]);
    }
  }
}

/** `values` at the kept indices. */
export const pick = <T>(values: readonly T[], idx: readonly number[]): T[] => idx.map((i) => values[i]);
