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

export function figureHtml(spec: PlotSpec, caption = spec.title): string {
  const visible = spec.series.filter((s) => !s.hidden);
  return (
    `<figure class="kplot" id="${esc(spec.id)}">` +
    `<figcaption>${esc(caption)}</figcaption>` +
    `<div class="kplot-area">${renderPlot(spec).svg}</div>` +
    `<div class="kplot-legend">${legendHtml(visible)}</div>` +
    (spec.note ? `<p class="kplot-note">${esc(spec.note)}</p>` : '') +
    `<script type="application/json" class="kplot-spec">${jsonForScript(spec)}</script>` +
    `</figure>`
  );
}
