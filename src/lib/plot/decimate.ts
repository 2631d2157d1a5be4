/**
 * Reduces a curve for display only: per bucket of indices, keeps the points of minimum and maximum
 * y so edges and peaks survive. The published numbers stay in the JSON documents; this only keeps
 * page weight in budget.
 */
export function decimate(x: number[], ys: (number | null)[][], maxPoints: number): { x: number[]; ys: (number | null)[][] } {
  const n = x.length;
  if (n <= maxPoints) return { x, ys };
  const buckets = Math.floor(maxPoints / 2);
  const keep = new Set<number>([0, n - 1]);
  const ref = ys[0];
  for (let b = 0; b < buckets; b++) {
    const i0 = Math.floor((b * n) / buckets);
    const i1 = Math.floor(((b + 1) * n) / buckets);
    let iMin = i0;
    let iMax = i0;
    for (let i = i0; i < i1; i++) {
      const v = ref[i];
      if (v === null) continue;
      if (ref[iMin] === null || v < (ref[iMin] as number)) iMin = i;
      if (ref[iMax] === null || v > (ref[iMax] as number)) iMax = i;
    }
    keep.add(iMin).add(iMax);
  }
  const idx = [...keep].sort((a, b) => a - b);
  return { x: idx.map((i) => x[i]), ys: ys.map((y) => idx.map((i) => y[i])) };
}
