/** Helpers that turn published arrays into compact PlotSpec series (rounded, decimated for display). */
import { decimate } from './decimate.ts';
import { roundSig } from './format.ts';
import { seriesColour, seriesDash } from './palette.ts';
import type { SeriesSpec } from './spec.ts';

/**
 * Points kept per curve for display: the plot frame is ~470 px wide, and min/max bucketing keeps
 * edges, so 300 points look the same as thousands and keep the page in its byte budget.
 */
export const MAX_LINE_POINTS = 300;

export function lineSeries(label: string, x: number[], y: (number | null)[], i: number, maxPoints = MAX_LINE_POINTS): SeriesSpec {
  const d = decimate(x, [y], maxPoints);
  return {
    label,
    kind: 'line',
    colour: seriesColour(i),
    dash: seriesDash(i) || undefined,
    x: d.x.map((v) => roundSig(v, 5) as number),
    y: d.ys[0].map((v) => roundSig(v, 4)),
  };
}

export function pointSeries(label: string, x: number[], y: (number | null)[], yErr: (number | null)[] | undefined, i: number): SeriesSpec {
  return {
    label,
    kind: 'points',
    colour: seriesColour(i),
    x: x.map((v) => roundSig(v, 6) as number),
    y: y.map((v) => roundSig(v, 5)),
    yErr: yErr?.map((v) => roundSig(v, 3)),
  };
}
