/**
 * Sequential colour map for the redistribution matrix: viridis (van der Walt & Smith 2015, designed
 * to be perceptually uniform and readable with colour-vision deficiencies), from d3-scale-chromatic.
 */
import { interpolateViridis } from 'd3-scale-chromatic';
import { rgb } from 'd3-color';
import { esc } from './format.ts';

/** RGB of the colour for t in [0, 1]. */
export function colourAt(t: number): [number, number, number] {
  const c = rgb(interpolateViridis(Math.min(1, Math.max(0, t))));
  return [Math.round(c.r), Math.round(c.g), Math.round(c.b)];
}

/** A vertical colour bar (SVG group) for log10 values lo..hi, labelled as powers of ten. */
export function colourBar(x: number, y: number, widthPx: number, heightPx: number, lo: number, hi: number, title: string, gradientId: string): string {
  const stops = Array.from({ length: 11 }, (_, i) => `<stop offset="${i * 10}%" stop-color="${interpolateViridis(i / 10)}"/>`).join('');
  const parts = [
    `<defs><linearGradient id="${esc(gradientId)}" x1="0" y1="1" x2="0" y2="0">${stops}</linearGradient></defs>`,
    `<rect x="${x}" y="${y}" width="${widthPx}" height="${heightPx}" fill="url(#${esc(gradientId)})" stroke="#333" stroke-width="0.5"/>`,
  ];
  const step = hi - lo > 8 ? 2 : 1;
  for (let v = Math.ceil(lo); v <= Math.floor(hi); v += step) {
    const yy = y + heightPx * (1 - (v - lo) / (hi - lo));
    parts.push(`<line x1="${x + widthPx}" x2="${x + widthPx + 4}" y1="${yy.toFixed(1)}" y2="${yy.toFixed(1)}" stroke="#333"/>`);
    parts.push(`<text x="${x + widthPx + 6}" y="${yy.toFixed(1)}" dy="0.32em" font-size="11">${v === 0 ? '1' : `10${v < 0 ? '⁻' : ''}${sup(Math.abs(v))}`}</text>`);
  }
  parts.push(`<text transform="translate(${x + widthPx + 40},${y + heightPx / 2}) rotate(-90)" text-anchor="middle" font-size="11">${esc(title)}</text>`);
  return `<g class="colourbar">${parts.join('')}</g>`;
}
const SUPS = '⁰¹²³⁴⁵⁶⁷⁸⁹';
const sup = (n: number) => String(n).split('').map((d) => SUPS[Number(d)]).join('');
