/**
 * A series as an SVG path, with gaps where values are missing or off a log axis. Each defined run
 * is thinned in screen space first (simplify.ts), so the path is as short as the picture allows.
 */
import type { NumScale } from './scales.ts';
import type { ScaleKind, SeriesSpec } from './spec.ts';
import { simplifyRun, simplifySteps } from './simplify.ts';

const ok = (v: number | null, kind: ScaleKind): v is number => v !== null && Number.isFinite(v) && (kind === 'linear' || v > 0);

/** One decimal of an SVG user unit (the viewBox is ~640 wide): finer is invisible. */
const f1 = (v: number): string => {
  const s = (Math.round(v * 10) / 10).toString();
  return s === '-0' ? '0' : s;
};

export function linePath(s: SeriesSpec, x: NumScale, y: NumScale, xKind: ScaleKind, yKind: ScaleKind): string {
  let d = '';
  let px: number[] = [];
  let py: number[] = [];
  const flush = () => {
    if (px.length) {
      if (s.step) d += stepRun(px, py);
      else {
        const keep = simplifyRun(px, py);
        d += keep.map((k, j) => `${j ? 'L' : 'M'}${f1(px[k])},${f1(py[k])}`).join('');
      }
    }
    px = [];
    py = [];
  };
  for (let i = 0; i < s.x.length; i++) {
    const yv = s.y[i];
    if (!ok(s.x[i], xKind) || !ok(yv, yKind)) {
      flush();
      continue;
    }
    px.push(x(s.x[i]));
    py.push(y(yv));
  }
  flush();
  return d;
}

/** Midpoint step (as d3's curveStep): horizontal to half-way, vertical, horizontal on. */
function stepRun(px: number[], py: number[]): string {
  const keep = simplifySteps(py);
  let d = `M${f1(px[keep[0]])},${f1(py[keep[0]])}`;
  for (let j = 1; j < keep.length; j++) {
    const b = keep[j];
    // A dropped run keeps the previous height up to the step into b, half-way before b.
    const xm = (px[b - 1] + px[b]) / 2;
    d += `H${f1(xm)}V${f1(py[b])}`;
    if (j === keep.length - 1) d += `H${f1(px[b])}`;
  }
  return d;
}
