/**
 * A plot as an HTML figure: the SVG (readable without JavaScript), the legend, and the spec as
 * embedded JSON that the client script uses for readouts, zoom and scale toggles.
 */
import { esc } from './format.ts';
import { legendHtml } from './legend.ts';
import { renderPlot } from './render.ts';
import type { PlotSpec } from './spec.ts';

/** JSON safe inside <script>: no "</script>" or "<!--" can appear. */
export const jsonForScript = (v: unknown): string => JSON.stringify(v).replace(/</g, '\\u003c');

/** Embedded form: a series whose x equals an earlier series' x stores {xOf: index} instead. */
type PackedSeries = Omit<PlotSpec['series'][number], 'x'> & { x?: number[]; xOf?: number };

export function packSpec(spec: PlotSpec): unknown {
  const series: PackedSeries[] = spec.series.map((s, i) => {
    const j = spec.series.findIndex((t, k) => k < i && t.x.length === s.x.length && t.x.every((v, n) => v === s.x[n]));
    if (j < 0) return s;
    const { x: _x, ...rest } = s;
    return { ...rest, xOf: j };
  });
  return { ...spec, series };
}

export function unpackSpec(packed: unknown): PlotSpec {
  const p = packed as Omit<PlotSpec, 'series'> & { series: PackedSeries[] };
  const series = p.series.map((s) => s as PlotSpec['series'][number]);
  p.series.forEach((s, i) => {
    if (s.xOf !== undefined) series[i] = { ...(s as object), x: series[s.xOf].x } as PlotSpec['series'][number];
  });
  return { ...p, series };
}

export interface FigureOptions {
  caption?: string;
  /**
   * URL of the data document the client builds this spec from on demand; when set, the spec is
   * not embedded (the SVG already shows the default view) and the page must pass a loader.
   */
  specSrc?: string;
}

export function figureHtml(spec: PlotSpec, opts: FigureOptions = {}): string {
  const caption = opts.caption ?? spec.title;
  const visible = spec.series.filter((s) => !s.hidden);
  const lazy = opts.specSrc !== undefined;
  const attrs = lazy
    ? ` data-spec-src="${esc(opts.specSrc!)}"${spec.x.toggle ? ` data-xlog="${spec.x.scale}"` : ''}${spec.y.toggle ? ` data-ylog="${spec.y.scale}"` : ''}`
    : '';
  return (
    `<figure class="kplot" id="${esc(spec.id)}"${attrs}>` +
    `<figcaption>${esc(caption)}</figcaption>` +
    `<div class="kplot-area">${renderPlot(spec).svg}</div>` +
    `<div class="kplot-legend">${legendHtml(visible)}</div>` +
    (spec.note ? `<p class="kplot-note">${esc(spec.note)}</p>` : '') +
    (lazy ? '' : `<script type="application/json" class="kplot-spec">${jsonForScript(packSpec(spec))}</script>`) +
    `</figure>`
  );
}
