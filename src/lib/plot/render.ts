/**
 * PlotSpec + PlotView → SVG string. Pure: runs in Node at build time (no DOM) and in the browser
 * when the reader zooms or switches scales.
 */
import { bottomAxis, leftAxis, type Frame } from './axes.ts';
import { axisTitle, esc } from './format.ts';
import { linePath } from './line.ts';
import { pointsPaths } from './points.ts';
import { clampDecades, dataExtent, makeScale, paddedDomain, type NumScale } from './scales.ts';
import { defaultView, type PlotSpec, type PlotView } from './spec.ts';

export const MARGIN = { left: 64, right: 14, top: 10, bottom: 44 };

export interface Rendered {
  svg: string;
  frame: Frame;
  x: NumScale;
  y: NumScale;
}

export function plotFrame(spec: PlotSpec): Frame {
  return {
    left: MARGIN.left,
    top: MARGIN.top,
    width: spec.widthPx - MARGIN.left - MARGIN.right,
    height: spec.heightPx - MARGIN.top - MARGIN.bottom,
  };
}

export function plotScales(spec: PlotSpec, view: PlotView): { x: NumScale; y: NumScale; frame: Frame } {
  const frame = plotFrame(spec);
  const xd = view.xDomain ?? (spec.x.domain && view.xScale === spec.x.scale ? spec.x.domain : paddedDomain(dataExtent(spec.series, 'x', view.xScale), view.xScale));
  let yExt = dataExtent(spec.series, 'y', view.yScale);
  if (view.yScale === 'log' && spec.y.maxDecades) yExt = clampDecades(yExt, spec.y.maxDecades);
  const yd = view.yDomain ?? (spec.y.domain && view.yScale === spec.y.scale ? spec.y.domain : paddedDomain(yExt, view.yScale));
  const x = makeScale(view.xScale, xd, [frame.left, frame.left + frame.width]);
  const y = makeScale(view.yScale, yd, [frame.top + frame.height, frame.top]);
  return { x, y, frame };
}

export function renderPlot(spec: PlotSpec, view: PlotView = defaultView(spec)): Rendered {
  const { x, y, frame } = plotScales(spec, view);
  const clipId = `clip-${spec.id}`;
  const body: string[] = [];
  if (spec.yRef !== undefined && (view.yScale === 'linear' || spec.yRef > 0)) {
    const yy = y(spec.yRef);
    if (yy >= frame.top && yy <= frame.top + frame.height)
      body.push(`<line class="ref" x1="${frame.left}" x2="${frame.left + frame.width}" y1="${yy.toFixed(1)}" y2="${yy.toFixed(1)}"/>`);
  }
  spec.series.forEach((s, i) => {
    if (s.hidden) return;
    const w = s.widthPx ?? 1.6;
    if (s.kind === 'line') {
      const d = linePath(s, x, y, view.xScale, view.yScale);
      body.push(`<path class="series" data-series="${i}" d="${d}" fill="none" stroke="${s.colour}" stroke-width="${w}"${s.dash ? ` stroke-dasharray="${s.dash}"` : ''}/>`);
    } else {
      const { markers, bars } = pointsPaths(s, x, y, view.xScale, view.yScale);
      if (bars) body.push(`<path class="errorbars" d="${bars}" fill="none" stroke="${s.colour}" stroke-width="1"/>`);
      body.push(`<path class="series points" data-series="${i}" d="${markers}" fill="#fff" stroke="${s.colour}" stroke-width="1.5"/>`);
    }
  });
  const svg =
    `<svg class="plot-svg" viewBox="0 0 ${spec.widthPx} ${spec.heightPx}" role="img" aria-label="${esc(spec.title)}" xmlns="http://www.w3.org/2000/svg">` +
    `<defs><clipPath id="${clipId}"><rect x="${frame.left}" y="${frame.top}" width="${frame.width}" height="${frame.height}"/></clipPath></defs>` +
    bottomAxis(x, view.xScale, frame, axisTitle(spec.x.label, spec.x.unit)) +
    leftAxis(y, view.yScale, frame, axisTitle(spec.y.label, spec.y.unit)) +
    `<g clip-path="url(#${clipId})">${body.join('')}</g>` +
    `<rect class="frame" x="${frame.left}" y="${frame.top}" width="${frame.width}" height="${frame.height}" fill="none"/>` +
    `</svg>`;
  return { svg, frame, x, y };
}
