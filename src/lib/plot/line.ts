/** A series as an SVG path (d3-shape line), with gaps where values are missing or off a log axis. */
import { curveLinear, curveStep, line } from 'd3-shape';
import type { NumScale } from './scales.ts';
import type { ScaleKind, SeriesSpec } from './spec.ts';

const ok = (v: number | null, kind: ScaleKind): v is number => v !== null && Number.isFinite(v) && (kind === 'linear' || v > 0);

export function linePath(s: SeriesSpec, x: NumScale, y: NumScale, xKind: ScaleKind, yKind: ScaleKind): string {
  const idx = s.x.map((_, i) => i);
  const gen = line<number>()
    .defined((i) => ok(s.x[i], xKind) && ok(s.y[i], yKind))
    .x((i) => x(s.x[i]))
    .y((i) => y(s.y[i] as number))
    .curve(s.step ? curveStep : curveLinear)
    .digits(1);
  return gen(idx) ?? '';
}
