/**
 * The compare page's body as an HTML string: used at build time for the default pair and in the
 * browser when the reader picks another pair. Only ratios and differences of published numbers.
 */
import type { ReleaseSite, ValidationReport } from '../../../generators/site-data/types.ts';
import { esc, figureHtml, fmt3, fmt4, lineSeries, type PlotSpec, type SeriesSpec } from '../plot/index.ts';
import { validationDiff } from './checks.ts';
import { difference, onGrid, ratio } from './interp.ts';
import { pairEpochs, pairLabel } from './epochs.ts';
import { parameterChanges } from './params.ts';

const W = 640;
const H = 230;
const EV_PER_KEV = 1000;

function pairPlot(id: string, title: string, yLabel: string, yUnit: string, series: SeriesSpec[], yRef: number, yScale: 'linear' | 'log' = 'linear'): PlotSpec {
  return { id, title, widthPx: W, heightPx: H, x: { label: 'Energy', unit: 'keV', scale: 'log', toggle: true }, y: { label: yLabel, unit: yUnit, scale: yScale, toggle: true }, yRef, series };
}

export function compareHtml(a: ReleaseSite, b: ReleaseSite, va: ValidationReport, vb: ValidationReport): string {
  const out: string[] = [];
  const lbl = `${b.id} vs ${a.id}`;
  for (const da of a.detectors) {
    const db = b.detectors.find((d) => d.id === da.id);
    out.push(`<section class="cmp-det"><h2 id="cmp-${esc(da.id)}">${esc(da.name)} <span class="muted">(${esc(da.kind)})</span></h2>`);
    if (!db) {
      out.push(`<p>Detector ${esc(da.id)} is not in release ${esc(b.id)}.</p></section>`);
      continue;
    }
    const eaR: SeriesSpec[] = [];
    const eaD: SeriesSpec[] = [];
    const pairs = pairEpochs(da.epochs, db.epochs);
    pairs.forEach((p, i) => {
      const yb = onGrid(p.a.energyKeV, p.b.energyKeV, p.b.effectiveAreaCm2);
      eaR.push(lineSeries(pairLabel(p), p.a.energyKeV, ratio(p.a.effectiveAreaCm2, yb), i));
      eaD.push(lineSeries(pairLabel(p), p.a.energyKeV, difference(p.a.effectiveAreaCm2, yb), i));
    });
    const crossed = pairs.filter((p) => p.a.id !== p.b.id);
    if (crossed.length)
      out.push(
        `<p class="muted">Epochs are paired by observation date: each epoch of ${esc(b.id)} against the epoch of ${esc(a.id)} ${crossed.every((p) => p.how === 'in force') ? 'in force' : 'in force (or nearest)'} on its reference date — ${crossed.map((p) => `${esc(p.b.id)} (${esc(p.b.date)}) vs ${esc(p.a.id)}`).join('; ')}.</p>`,
      );
    const unchanged = pairs.filter((p) => p.a.effectiveAreaCm2.length === p.b.effectiveAreaCm2.length && p.a.effectiveAreaCm2.every((v, k) => v === p.b.effectiveAreaCm2[k]) && p.a.energyKeV.every((v, k) => v === p.b.energyKeV[k]));
    if (unchanged.length) out.push(`<p class="muted">Effective area identical in both releases for ${esc(unchanged.map(pairLabel).join(', '))} (ratio 1, difference 0).</p>`);
    const r = da.resolution;
    const fb = onGrid(r.energyKeV, db.resolution.energyKeV, db.resolution.fwhmEv);
    const cb = onGrid(r.energyKeV, db.resolution.energyKeV, db.resolution.centroidOffsetEv);
    const centA = r.energyKeV.map((e, i) => e * EV_PER_KEV + r.centroidOffsetEv[i]);
    const centB = r.energyKeV.map((e, i) => (cb[i] === null ? null : e * EV_PER_KEV + (cb[i] as number)));
    const id = (s: string) => `cmp-${s}-${da.id}`;
    out.push('<div class="plot-grid">');
    out.push(figureHtml(pairPlot(id('ea-r'), `Effective area ratio ${b.id} / ${a.id}`, 'Ratio', '', eaR, 1)));
    out.push(figureHtml(pairPlot(id('ea-d'), `Effective area difference ${b.id} − ${a.id}`, 'Difference', 'cm²', eaD, 0)));
    out.push(figureHtml(pairPlot(id('fw-r'), `FWHM ratio ${b.id} / ${a.id}`, 'Ratio', '', [lineSeries('model FWHM', r.energyKeV, ratio(r.fwhmEv, fb), 0)], 1)));
    out.push(figureHtml(pairPlot(id('fw-d'), `FWHM difference ${b.id} − ${a.id}`, 'Difference', 'eV', [lineSeries('model FWHM', r.energyKeV, difference(r.fwhmEv, fb), 0)], 0)));
    out.push(figureHtml(pairPlot(id('ce-r'), `Centroid energy ratio ${b.id} / ${a.id}`, 'Ratio', '', [lineSeries('model centroid', r.energyKeV, ratio(centA, centB), 0)], 1)));
    out.push(figureHtml(pairPlot(id('ce-d'), `Centroid difference ${b.id} − ${a.id}`, 'Difference', 'eV', [lineSeries('model centroid', r.energyKeV, difference(r.centroidOffsetEv, cb), 0)], 0)));
    out.push('</div></section>');
  }

  const pc = parameterChanges(a.parameters, b.parameters);
  const nChanged = pc.filter((p) => p.changed).length;
  out.push(`<section><h2 id="cmp-params">Parameter changes <span class="muted">(${nChanged} of ${pc.length} differ; ${esc(lbl)})</span></h2>`);
  out.push(`<div class="table-wrap"><table class="data"><thead><tr><th>Detector</th><th>Group</th><th>Parameter</th><th class="num">${esc(a.id)}</th><th class="num">${esc(b.id)}</th><th class="num">Δ</th><th class="num">Δ/σ</th><th>Unit</th></tr></thead><tbody>`);
  const v = (p: { value: number; uncertainty: number | null } | null) => (p ? `${fmt4(p.value)}${p.uncertainty !== null ? ` ± ${fmt3(p.uncertainty)}` : ''}` : '<em>absent</em>');
  for (const p of pc)
    out.push(
      `<tr class="${p.changed ? 'changed' : 'same'}"><td>${esc(p.detector ?? 'all')}</td><td>${esc(p.group)}</td><td>${esc(p.name)}</td><td class="num">${v(p.a)}</td><td class="num">${v(p.b)}</td><td class="num">${p.delta === null ? '—' : fmt3(p.delta)}</td><td class="num">${p.deltaSigma === null ? '—' : fmt3(p.deltaSigma)}</td><td>${esc(p.unit)}</td></tr>`,
    );
  out.push('</tbody></table></div></section>');

  const vd = validationDiff(va, vb);
  out.push(`<section><h2 id="cmp-checks">Validation differences <span class="muted">(${vd.length})</span></h2>`);
  if (!vd.length) out.push('<p>Both releases have the same checks with the same results.</p>');
  else {
    out.push(`<div class="table-wrap"><table class="data"><thead><tr><th>Check</th><th>Product</th><th>${esc(a.id)}</th><th>${esc(b.id)}</th></tr></thead><tbody>`);
    const cell = (c: (typeof vd)[number]['a']) =>
      c ? `<span class="st st-${c.status}">${c.status}</span> ${esc(c.measured === null ? '' : String(typeof c.measured === 'number' ? fmt4(c.measured) : c.measured))}${c.unit ? ` ${esc(c.unit)}` : ''}` : '<em>absent</em>';
    for (const d of vd) out.push(`<tr><td>${esc(d.title)} <code>${esc(d.id)}</code></td><td>${esc(d.product ?? 'release')}</td><td>${cell(d.a)}</td><td>${cell(d.b)}</td></tr>`);
    out.push('</tbody></table></div>');
  }
  out.push('</section>');
  return out.join('');
}

/** Default pair: the newest release against the one it supersedes (else the next older). */
export function defaultPair(ids: { id: string; supersedes: string | null }[]): [string, string] | null {
  if (ids.length < 2) return null;
  const b = ids[0];
  const a = ids.find((r) => r.id === b.supersedes) ?? ids[1];
  return [a.id, b.id];
}
