/** Markers with vertical 1σ error bars, as one SVG path per series (compact). */
import type { NumScale } from './scales.ts';
import type { ScaleKind, SeriesSpec } from './spec.ts';

const MARKER_R = 3;
const CAP_PX = 3;

export function pointsPaths(s: SeriesSpec, x: NumScale, y: NumScale, xKind: ScaleKind, yKind: ScaleKind): { markers: string; bars: string } {
  let markers = '';
  let bars = '';
  const okX = (v: number) => Number.isFinite(v) && (xKind === 'linear' || v > 0);
  const okY = (v: number) => Number.isFinite(v) && (yKind === 'linear' || v > 0);
  for (let i = 0; i < s.x.length; i++) {
    const yv = s.y[i];
    if (yv === null || !okX(s.x[i]) || !okY(yv)) continue;
    const px = x(s.x[i]);
    const py = y(yv);
    markers += `M${(px - MARKER_R).toFixed(1)},${py.toFixed(1)}a${MARKER_R},${MARKER_R} 0 1,0 ${2 * MARKER_R},0a${MARKER_R},${MARKER_R} 0 1,0 ${-2 * MARKER_R},0`;
    const e = s.yErr?.[i];
    if (e) {
      const lo = yv - e;
      const yLo = okY(lo) ? y(lo) : y.range()[0];
      const yHi = y(yv + e);
      bars += `M${px.toFixed(1)},${yLo.toFixed(1)}V${yHi.toFixed(1)}M${(px - CAP_PX).toFixed(1)},${yLo.toFixed(1)}h${2 * CAP_PX}M${(px - CAP_PX).toFixed(1)},${yHi.toFixed(1)}h${2 * CAP_PX}`;
    }
  }
  return { markers, bars };
}
