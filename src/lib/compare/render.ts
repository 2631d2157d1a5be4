/**
 * The compare page's body as an HTML string: used at build time for the default pair and in the
 * browser when the reader picks another pair. Only ratios and differences of published numbers:
 * effective area as a ratio B / A and a difference; FWHM and centroid as differences in eV (a
 * ratio of centroids would hide a 10 eV shift in a number like 0.998).
 */
import type { ParameterRow, ReleaseSite, ValidationReport } from '../../../generators/site-data/types.ts';
import { decimate, esc, figureHtml, fmt3, fmtMeasured, lineSeries, MAX_LINE_POINTS, roundSig, type PlotSpec, type SeriesSpec } from '../plot/index.ts';
import { splitValidationDiff } from './checks.ts';
import { difference, onGrid, ratio } from './interp.ts';
import { pairEpochs, pairLabel } from './epochs.ts';
import { parameterChanges, type ParameterChange } from './params.ts';

const W = 640;
const H = 230;
/** Digits kept for ratios and differences: the published curves carry four significant digits. */
const DIFF_DIGITS = 6;
/** The site documents round curves to four significant digits (generators/pipeline/site-detector.ts). */
const SITE_CURVE_DIGITS = 4;

const same = (x: readonly number[], y: readonly number[]) => x.length === y.length && x.every((v, k) => v === y[k]);

/** "A = 1.1.0", "B = 2.0.0": every title and header says which release is which. */
const tagA = (a: ReleaseSite) => `A = ${a.id}`;
const tagB = (b: ReleaseSite) => `B = ${b.id}`;

/** Differences (yRef 0) change sign, so only ratio plots offer a log y axis. */
function pairPlot(id: string, title: string, yLabel: string, yUnit: string, series: SeriesSpec[], yRef: number, note?: string): PlotSpec {
  return { id, title, widthPx: W, heightPx: H, x: { label: 'Energy', unit: 'keV', scale: 'log', toggle: true }, y: { label: yLabel, unit: yUnit, scale: 'linear', toggle: yRef > 0 }, yRef, series, note };
}

/** lineSeries keeps 4 digits: enough for a curve, too coarse for a ratio that differs from 1 at 1e-4. */
const precise = (label: string, x: number[], y: (number | null)[], i: number): SeriesSpec => {
  const d = decimate(x, [y], MAX_LINE_POINTS);
  return { ...lineSeries(label, [], [], i), x: d.x.map((v) => roundSig(v, 5) as number), y: d.ys[0].map((v) => roundSig(v, DIFF_DIGITS)) };
};

export function compareHtml(a: ReleaseSite, b: ReleaseSite, va: ValidationReport, vb: ValidationReport): string {
  const out: string[] = [];
  const AB = `${tagB(b)} against ${tagA(a)}`;
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
      eaR.push(precise(pairLabel(p), p.a.energyKeV, ratio(p.a.effectiveAreaCm2, yb), i));
      eaD.push(precise(pairLabel(p), p.a.energyKeV, difference(p.a.effectiveAreaCm2, yb), i));
    });
    const crossed = pairs.filter((p) => p.a.id !== p.b.id);
    if (crossed.length)
      out.push(
        `<p class="muted">Epochs are paired by observation date: each epoch of B (${esc(b.id)}) against the epoch of A (${esc(a.id)}) ${crossed.every((p) => p.how === 'in force') ? 'in force' : 'in force (or nearest)'} on its reference date — ${crossed.map((p) => `${esc(p.b.id)} (${esc(p.b.date)}) vs ${esc(p.a.id)}`).join('; ')}.</p>`,
      );
    const unchanged = pairs.filter((p) => same(p.a.effectiveAreaCm2, p.b.effectiveAreaCm2) && same(p.a.energyKeV, p.b.energyKeV));
    const eaNote = (what: string) =>
      !unchanged.length
        ? undefined
        : unchanged.length === pairs.length
          ? `Identical in A and B for every epoch: all curves lie on the dashed line (${what}).`
          : `Identical in A and B for ${unchanged.map(pairLabel).join(', ')}: those curves lie on the dashed line (${what}).`;
    const r = da.resolution;
    const rb = db.resolution;
    const fb = onGrid(r.energyKeV, rb.energyKeV, rb.fwhmEv);
    const cb = onGrid(r.energyKeV, rb.energyKeV, rb.centroidOffsetEv);
    const sameGrid = same(r.energyKeV, rb.energyKeV);
    const flat = (what: string) => `Identical model ${what} in A and B: the difference is 0 eV at every energy (flat line).`;
    const id = (s: string) => `cmp-${s}-${da.id}`;
    out.push(`<h3>Effective area <span class="muted">(${esc(AB)})</span></h3><div class="plot-grid">`);
    out.push(figureHtml(pairPlot(id('ea-r'), `${da.name}: effective area ratio B / A (${b.id} / ${a.id})`, 'Ratio B / A', '', eaR, 1, eaNote('ratio 1'))));
    const rounding = `The published curves carry ${SITE_CURVE_DIGITS} significant digits: wiggles below about ${fmt3(0.5 * 10 ** (1 - SITE_CURVE_DIGITS) * 100)} % of the area are that rounding.`;
    out.push(figureHtml(pairPlot(id('ea-d'), `${da.name}: effective area difference B − A (${b.id} − ${a.id})`, 'B − A', 'cm²', eaD, 0, [eaNote('difference 0 cm²'), rounding].filter(Boolean).join(' '))));
    out.push('</div>');
    out.push(`<h3>Resolution and energy scale <span class="muted">(model curves, ${esc(AB)})</span></h3><div class="plot-grid">`);
    out.push(
      figureHtml(
        pairPlot(id('fw-d'), `${da.name}: FWHM difference B − A (${b.id} − ${a.id})`, 'FWHM B − A', 'eV', [precise('model FWHM, B − A', r.energyKeV, difference(r.fwhmEv, fb), 0)], 0, sameGrid && same(r.fwhmEv, rb.fwhmEv) ? flat('FWHM') : undefined),
      ),
    );
    out.push(
      figureHtml(
        pairPlot(
          id('ce-d'),
          `${da.name}: centroid difference B − A (${b.id} − ${a.id})`,
          'Centroid B − A',
          'eV',
          [precise('model centroid, B − A', r.energyKeV, difference(r.centroidOffsetEv, cb), 0)],
          0,
          sameGrid && same(r.centroidOffsetEv, rb.centroidOffsetEv) ? flat('centroid') : 'Difference of the published centroid offsets (centroid − line energy) at the same photon energy.',
        ),
      ),
    );
    out.push('</div></section>');
  }
  out.push(parametersHtml(a, b));
  out.push(validationHtml(a, b, va, vb));
  return out.join('');
}

function parameterRows(rows: ParameterChange[]): string {
  const v = (p: ParameterRow | null) => {
    if (!p) return '<em>absent</em>';
    const m = fmtMeasured(p.value, p.uncertainty);
    return p.uncertainty !== null ? `${m.value} ± ${m.uncertainty}` : m.value;
  };
  return rows
    .map(
      (p) =>
        `<tr class="${p.changed ? 'changed' : 'same'}"><td>${esc(p.detector ?? 'all')}</td><td>${esc(p.group)}</td><td>${esc(p.name)}</td><td class="num">${v(p.a)}</td><td class="num">${v(p.b)}</td><td class="num">${p.delta === null ? '—' : fmt3(p.delta)}</td><td class="num">${p.deltaSigma === null ? '—' : fmt3(p.deltaSigma)}</td><td>${esc(p.unit)}</td></tr>`,
    )
    .join('');
}

function parametersHtml(a: ReleaseSite, b: ReleaseSite): string {
  const pc = parameterChanges(a.parameters, b.parameters);
  const changed = pc.filter((p) => p.changed);
  const kept = pc.filter((p) => !p.changed);
  const head = `<thead><tr><th>Detector</th><th>Group</th><th>Parameter</th><th class="num">A = ${esc(a.id)}</th><th class="num">B = ${esc(b.id)}</th><th class="num">Δ = B − A</th><th class="num" title="Δ over both 1σ uncertainties added in quadrature">Δ / σ</th><th>Unit</th></tr></thead>`;
  const out: string[] = [`<section><h2 id="cmp-params">Parameter changes <span class="muted">(${changed.length} of ${pc.length} differ)</span></h2>`];
  out.push('<p class="muted">Values ± 1σ. Δ / σ divides the change by both uncertainties added in quadrature (when both releases give one).</p>');
  if (changed.length) out.push(`<div class="table-wrap"><table class="data" id="cmp-params-changed">${head}<tbody>${parameterRows(changed)}</tbody></table></div>`);
  else out.push('<p>No parameter differs.</p>');
  if (kept.length) out.push(`<details><summary>${kept.length} unchanged parameters</summary><div class="table-wrap"><table class="data">${head}<tbody>${parameterRows(kept)}</tbody></table></div></details>`);
  out.push('</section>');
  return out.join('');
}

function validationHtml(a: ReleaseSite, b: ReleaseSite, va: ValidationReport, vb: ValidationReport): string {
  const { both, onlyA, onlyB } = splitValidationDiff(va, vb);
  const n = both.length + onlyA.reduce((s, g) => s + g.checks.length, 0) + onlyB.reduce((s, g) => s + g.checks.length, 0);
  const out: string[] = [`<section><h2 id="cmp-checks">Validation differences <span class="muted">(${n} checks)</span></h2>`];
  if (!n) out.push('<p>Both releases have the same checks with the same results.</p>');
  const tally = (checks: { status: string }[]) =>
    ['fail', 'warn', 'review', 'pass']
      .map((s) => [s, checks.filter((c) => c.status === s).length] as const)
      .filter(([, k]) => k)
      .map(([s, k]) => `${k} ${s}`)
      .join(', ');
  const groups = (side: string, rel: string, gs: typeof onlyA) =>
    gs.length
      ? `<p>Only in ${side} = ${esc(rel)}: ${gs.map((g) => `<strong>${esc(g.product ?? 'release-level checks')}</strong> (${g.checks.length} checks: ${tally(g.checks)})`).join('; ')}.</p>`
      : '';
  out.push(groups('A', a.id, onlyA), groups('B', b.id, onlyB));
  if (both.length) {
    out.push(`<div class="table-wrap"><table class="data" id="cmp-checks-table"><thead><tr><th>Check</th><th>Product</th><th>A = ${esc(a.id)}</th><th>B = ${esc(b.id)}</th></tr></thead><tbody>`);
    const cell = (c: (typeof both)[number]['a']) =>
      c ? `<span class="st st-${c.status}">${c.status}</span> ${esc(c.measured === null ? '' : typeof c.measured === 'number' ? fmtMeasured(c.measured, null).value : c.measured)}${c.unit ? ` ${esc(c.unit)}` : ''}` : '<em>absent</em>';
    for (const d of both) out.push(`<tr><td>${esc(d.title)} <code>${esc(d.id)}</code></td><td class="nowrap">${esc(d.product ?? 'release')}</td><td>${cell(d.a)}</td><td>${cell(d.b)}</td></tr>`);
    out.push('</tbody></table></div>');
  }
  out.push('</section>');
  return out.join('');
}

/** A pair of two instruments is shown, but said to be one before any number: their products describe different hardware. */
export function crossInstrumentNote(a: { id: string; instrument: string }, b: { id: string; instrument: string }): string {
  if (a.instrument === b.instrument) return '';
  return `<p class="callout" id="cmp-cross-instrument"><strong>Different instruments:</strong> A = ${esc(a.id)} is a release of ${esc(a.instrument)}, B = ${esc(b.id)} of ${esc(b.instrument)}. Their differences are not a change of calibration; the build never reviews such a pair.</p>`;
}

/** Default pair: the newest release against the one it supersedes (else the next older). */
export function defaultPair(ids: { id: string; supersedes: string | null }[]): [string, string] | null {
  if (ids.length < 2) return null;
  const b = ids[0];
  const a = ids.find((r) => r.id === b.supersedes) ?? ids[1];
  return [a.id, b.id];
}
