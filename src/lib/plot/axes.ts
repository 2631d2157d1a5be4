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

export function bottomAxis(scale: NumScale, kind: ScaleKind, frame: Frame, title: string): string {
  const y0 = frame.top + frame.height;
  const parts: string[] = [`<g class="axis x">`];
  for (const t of ticks(scale, kind, Math.max(3, Math.round(frame.width / 80)))) {
    const x = scale(t.value).toFixed(1);
    const len = t.label ? TICK_PX : TICK_PX - 2;
    parts.push(`<line class="grid" x1="${x}" x2="${x}" y1="${frame.top}" y2="${y0}"${t.label ? '' : ' data-minor=""'}/>`);
    parts.push(`<line x1="${x}" x2="${x}" y1="${y0}" y2="${y0 + len}"/>`);
    if (t.label) parts.push(`<text x="${x}" y="${y0 + TICK_PX + FONT_PX}" text-anchor="middle">${esc(t.label)}</text>`);
  }
  parts.push(`<line x1="${frame.left}" x2="${frame.left + frame.width}" y1="${y0}" y2="${y0}"/>`);
  parts.push(`<text class="title" x="${frame.left + frame.width / 2}" y="${y0 + TICK_PX + 2 * FONT_PX + 8}" text-anchor="middle">${esc(title)}</text>`);
  parts.push('</g>');
  return parts.join('');
}

export function leftAxis(scale: NumScale, kind: ScaleKind, frame: Frame, title: string): string {
  const x0 = frame.left;
  const parts: string[] = [`<g class="axis y">`];
  for (const t of ticks(scale, kind, Math.max(3, Math.round(frame.height / 45)))) {
    const y = scale(t.value).toFixed(1);
    const len = t.label ? TICK_PX : TICK_PX - 2;
    parts.push(`<line class="grid" x1="${x0}" x2="${x0 + frame.width}" y1="${y}" y2="${y}"${t.label ? '' : ' data-minor=""'}/>`);
    parts.push(`<line x1="${x0 - len}" x2="${x0}" y1="${y}" y2="${y}"/>`);
    if (t.label) parts.push(`<text x="${x0 - TICK_PX - 3}" y="${y}" dy="0.32em" text-anchor="end">${esc(t.label)}</text>`);
  }
  parts.push(`<line x1="${x0}" x2="${x0}" y1="${frame.top}" y2="${frame.top + frame.height}"/>`);
  const cy = frame.top + frame.height / 2;
  parts.push(`<text class="title" transform="translate(${x0 - 48},${cy}) rotate(-90)" text-anchor="middle">${esc(title)}</text>`);
  parts.push('</g>');
  return parts.join('');
}
