/**
 * Axes as SVG strings: d3 tick logic (scale.ticks / tickFormat) without a DOM. Log axes label
 * only the ticks d3's log tickFormat keeps (1, 2, 5 per decade at most), with minor ticks unlabelled.
 */
import type { NumScale } from './scales.ts';
import type { ScaleKind } from './spec.ts';
import { esc } from './format.ts';

const TICK_PX = 5;
const FONT_PX = 11;

export interface Frame {
  left: number;
  top: number;
  width: number;
  height: number;
}

interface Tick {
  value: number;
  label: string;
}

export function ticks(scale: NumScale, kind: ScaleKind, approx: number): Tick[] {
  const ts = scale.ticks(approx);
  if (kind === 'log') {
    const f = scale.tickFormat(approx, '~g');
    const out = ts.map((v) => ({ value: v, label: f(v) }));
    // Very wide ranges: keep labels on decades only.
    const labelled = out.filter((t) => t.label !== '');
    if (labelled.length > 9) for (const t of out) if (Math.abs(Math.log10(t.value) % 1) > 1e-9) t.label = '';
    return out.map((t) => ({ ...t, label: t.label === '' ? '' : decadeLabel(t.value, t.label) }));
  }
  const f = scale.tickFormat(approx);
  return ts.map((v) => ({ value: v, label: f(v).replace('−', '−') }));
}

/** 1e-5 reads better as 10⁻⁵ on probability axes. */
function decadeLabel(v: number, fallback: string): string {
  const e = Math.log10(v);
  if (Math.abs(e - Math.round(e)) < 1e-9 && (e <= -3 || e >= 4)) return `10${superscript(Math.round(e))}`;
  return fallback;
}
const SUP: Record<string, string> = { '-': '⁻', '0': '⁰', '1': '¹', '2': '²', '3': '³', '4': '⁴', '5': '⁵', '6': '⁶', '7': '⁷', '8': '⁸', '9': '⁹' };
const superscript = (n: number) => String(n).split('').map((c) => SUP[c] ?? c).join('');

/** Grid and tick marks as one path each (compact); minor log ticks get a tick but no grid line. */
export function bottomAxis(scale: NumScale, kind: ScaleKind, frame: Frame, title: string): string {
  const y0 = frame.top + frame.height;
  let grid = '';
  let marks = '';
  const labels: string[] = [];
  for (const t of ticks(scale, kind, Math.max(3, Math.round(frame.width / 80)))) {
    const x = scale(t.value).toFixed(1);
    if (t.label) grid += `M${x},${frame.top}V${y0}`;
    marks += `M${x},${y0}v${t.label ? TICK_PX : TICK_PX - 2}`;
    if (t.label) labels.push(`<text x="${x}" y="${y0 + TICK_PX + FONT_PX}" text-anchor="middle">${esc(t.label)}</text>`);
  }
  return (
    `<g class="axis x"><path class="grid" d="${grid}"/><path d="${marks}M${frame.left},${y0}h${frame.width}"/>${labels.join('')}` +
    `<text class="title" x="${frame.left + frame.width / 2}" y="${y0 + TICK_PX + 2 * FONT_PX + 8}" text-anchor="middle">${esc(title)}</text></g>`
  );
}

export function leftAxis(scale: NumScale, kind: ScaleKind, frame: Frame, title: string): string {
  const x0 = frame.left;
  let grid = '';
  let marks = '';
  const labels: string[] = [];
  for (const t of ticks(scale, kind, Math.max(3, Math.round(frame.height / 45)))) {
    const y = scale(t.value).toFixed(1);
    if (t.label) grid += `M${x0},${y}h${frame.width}`;
    const len = t.label ? TICK_PX : TICK_PX - 2;
    marks += `M${x0 - len},${y}h${len}`;
    if (t.label) labels.push(`<text x="${x0 - TICK_PX - 3}" y="${y}" dy="0.32em" text-anchor="end">${esc(t.label)}</text>`);
  }
  const cy = frame.top + frame.height / 2;
  return (
    `<g class="axis y"><path class="grid" d="${grid}"/><path d="${marks}M${x0},${frame.top}v${frame.height}"/>${labels.join('')}` +
    `<text class="title" transform="translate(${x0 - 48},${cy}) rotate(-90)" text-anchor="middle">${esc(title)}</text></g>`
  );
}
