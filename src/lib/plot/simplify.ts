/**
 * Render-time thinning of a polyline in screen space (SVG user units): the drawn picture stays
 * within `tolPx` of the full data, so the static SVG stays small while the spec keeps every
 * published point for readouts and zooming (each zoom re-thins for the new view).
 */

/** Largest deviation (in px) a dropped vertex may have from the drawn segment: a third of a pixel. */
export const SIMPLIFY_TOL_PX = 0.33;

/** Ramer–Douglas–Peucker on one run of points; returns the indices kept (sorted). */
export function simplifyRun(px: number[], py: number[], tolPx = SIMPLIFY_TOL_PX): number[] {
  const n = px.length;
  if (n <= 2) return [...Array(n).keys()];
  const keep = new Uint8Array(n);
  keep[0] = keep[n - 1] = 1;
  const stack: [number, number][] = [[0, n - 1]];
  const tol2 = tolPx * tolPx;
  while (stack.length) {
    const [a, b] = stack.pop()!;
    const dx = px[b] - px[a];
    const dy = py[b] - py[a];
    const len2 = dx * dx + dy * dy;
    let worst = -1;
    let worstD = tol2;
    for (let i = a + 1; i < b; i++) {
      let d: number;
      if (len2 === 0) d = (px[i] - px[a]) ** 2 + (py[i] - py[a]) ** 2;
      else {
        const c = dx * (py[i] - py[a]) - dy * (px[i] - px[a]);
        d = (c * c) / len2;
      }
      if (d > worstD) ((worstD = d), (worst = i));
    }
    if (worst > 0) {
      keep[worst] = 1;
      stack.push([a, worst], [worst, b]);
    }
  }
  const out: number[] = [];
  for (let i = 0; i < n; i++) if (keep[i]) out.push(i);
  return out;
}

/**
 * Step curves (channel histograms drawn with a midpoint step): a vertex whose y equals both
 * neighbours' (to `tolPx`) draws nothing of its own, so runs of equal height keep their ends only.
 */
export function simplifySteps(py: number[], tolPx = SIMPLIFY_TOL_PX): number[] {
  const n = py.length;
  const out: number[] = [];
  for (let i = 0; i < n; i++) {
    if (i > 0 && i < n - 1 && Math.abs(py[i] - py[i - 1]) <= tolPx && Math.abs(py[i + 1] - py[i]) <= tolPx && Math.abs(py[i + 1] - py[out[out.length - 1]]) <= tolPx) continue;
    out.push(i);
  }
  return out;
}
