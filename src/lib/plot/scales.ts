/** d3 scales for a plot, with domains that survive log axes (positive values only). */
import { scaleLinear, scaleLog, type ScaleContinuousNumeric } from 'd3-scale';
import type { ScaleKind, SeriesSpec } from './spec.ts';

export type NumScale = ScaleContinuousNumeric<number, number>;

export function makeScale(kind: ScaleKind, domain: [number, number], range: [number, number]): NumScale {
  const s = kind === 'log' ? scaleLog() : scaleLinear();
  return s.domain(domain).range(range) as NumScale;
}

const usable = (v: number | null | undefined, kind: ScaleKind): v is number =>
  v !== null && v !== undefined && Number.isFinite(v) && (kind === 'linear' || v > 0);

/** Extent of the x or y values of the series (with error bars for y), valid for the scale kind. */
export function dataExtent(series: SeriesSpec[], axis: 'x' | 'y', kind: ScaleKind): [number, number] {
  let lo = Infinity;
  let hi = -Infinity;
  for (const s of series) {
    if (s.hidden) continue;
    const vs = axis === 'x' ? s.x : s.y;
    for (let i = 0; i < vs.length; i++) {
      const v = vs[i];
      if (!usable(v, kind)) continue;
      const e = axis === 'y' && s.yErr ? (s.yErr[i] ?? 0) : 0;
      const a = v - e;
      const b = v + e;
      lo = Math.min(lo, usable(a, kind) ? a : v);
      hi = Math.max(hi, b);
    }
  }
  if (!Number.isFinite(lo)) return kind === 'log' ? [0.1, 1] : [0, 1];
  if (lo === hi) return kind === 'log' ? [lo / 2, hi * 2] : [lo - 1, hi + 1];
  return [lo, hi];
}

/** Fraction of the data range added on each side so curves do not touch the frame. */
const PAD = 0.03;

/** Domain padded a little (in log space for log axes); not niced, so no empty decades appear. */
export function paddedDomain(extent: [number, number], kind: ScaleKind): [number, number] {
  if (kind === 'log') {
    const [a, b] = [Math.log10(extent[0]), Math.log10(extent[1])];
    const pad = (b - a) * PAD;
    return [10 ** (a - pad), 10 ** (b + pad)];
  }
  const pad = (extent[1] - extent[0]) * PAD;
  return [extent[0] - pad, extent[1] + pad];
}

/** For log axes spanning many decades, keep the top `maxDecades` decades (probabilities, areas). */
export function clampDecades(domain: [number, number], maxDecades: number): [number, number] {
  const lo = Math.max(domain[0], domain[1] / 10 ** maxDecades);
  return [lo, domain[1]];
}
