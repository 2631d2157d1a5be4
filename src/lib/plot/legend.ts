/** Legend as an HTML list under the plot (wraps on narrow screens, readable in print and by screen readers). */
import type { SeriesSpec } from './spec.ts';
import { esc } from './format.ts';

export function legendHtml(series: SeriesSpec[]): string {
  if (series.length < 2) return '';
  const items = series.map((s) => {
    const swatch =
      s.kind === 'points'
        ? `<svg width="22" height="10" aria-hidden="true"><circle cx="11" cy="5" r="3" fill="none" stroke="${s.colour}" stroke-width="1.5"/></svg>`
        : `<svg width="22" height="10" aria-hidden="true"><line x1="1" x2="21" y1="5" y2="5" stroke="${s.colour}" stroke-width="2"${s.dash ? ` stroke-dasharray="${s.dash}"` : ''}/></svg>`;
    return `<li>${swatch}${esc(s.label)}</li>`;
  });
  return `<ul class="legend">${items.join('')}</ul>`;
}
