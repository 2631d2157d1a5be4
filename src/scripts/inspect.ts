/** Inspect page: local file → project reader + checks (+ fitsjs) → tables and plots. No uploads. */
import type { Check, ReleaseSite } from '../../generators/site-data/types.ts';
import { analyseBytes, binOf, maybeGunzip, rmfRow, secondOpinion, type Analysis } from '../lib/inspect/index.ts';
import { onGrid, ratio } from '../lib/compare/interp.ts';
import { esc, figureHtml, fmt3, fmt4, lineSeries, type PlotSpec, type SeriesSpec } from '../lib/plot/index.ts';
import { initPlots } from './plots.ts';

const ORDER = ['fail', 'warn', 'review', 'pass'];
const W = 640;
const H = 280;

function checksRows(checks: Check[]): string {
  const v = (x: number | string | null) => (x === null ? '—' : typeof x === 'number' ? fmt4(x) : esc(x));
  return checks.map((c) => `<tr><td><span class="st st-${c.status}">${c.status}</span></td><td>${esc(c.title)}<br><code class="muted">${esc(c.id)}</code></td><td class="num">${v(c.measured)}</td><td class="num">${v(c.tolerance)}</td><td>${esc(c.unit ?? '')}</td><td>${esc(c.message)}</td></tr>`).join('');
}

/** Failures, warnings and items to review first; the passes folded away (long for an RMF). */
function checksTable(checks: Check[]): string {
  const sorted = [...checks].sort((a, b) => ORDER.indexOf(a.status) - ORDER.indexOf(b.status));
  const n = (s: string) => checks.filter((c) => c.status === s).length;
  const head = '<thead><tr><th>Result</th><th>Check</th><th class="num">Measured</th><th class="num">Tolerance</th><th>Unit</th><th>Message</th></tr></thead>';
  const open = sorted.filter((c) => c.status !== 'pass');
  const passed = sorted.filter((c) => c.status === 'pass');
  return (
    `<p id="inspect-counts">${n('fail')} fail · ${n('warn')} warn · ${n('review')} to review · ${n('pass')} pass</p>` +
    `<div class="table-wrap"><table class="data" id="inspect-checks">${head}<tbody>${checksRows(open)}</tbody></table></div>` +
    (passed.length ? `<details><summary>${passed.length} passed checks</summary><div class="table-wrap"><table class="data" id="inspect-passed">${head}<tbody>${checksRows(passed)}</tbody></table></div></details>` : '')
  );
}

async function release(id: string): Promise<ReleaseSite> {
  const r = await fetch(`/data/releases/${encodeURIComponent(id)}/site.json`);
  if (!r.ok) throw new Error(`release ${id}: HTTP ${r.status}`);
  return r.json();
}

async function plots(a: Analysis, against: string): Promise<string> {
  const [relId, productId] = against ? against.split('|') : ['', ''];
  const site = relId ? await release(relId) : null;
  const prod = site?.products.find((p) => p.id === productId);
  const det = prod ? site!.detectors.find((d) => d.id === prod.detector) : undefined;
  const out: string[] = [];
  if (a.arf) {
    const d = a.arf;
    const e = Array.from(d.energLoKeV, (lo, i) => (lo + d.energHiKeV[i]) / 2);
    const series: SeriesSpec[] = [lineSeries(a.fileName, e, Array.from(d.specrespCm2), 0)];
    const ep = det?.epochs.find((x) => x.id === prod!.epoch);
    if (ep) series.push(lineSeries(`release ${relId} ${det!.id} ${ep.id}`, ep.energyKeV, ep.effectiveAreaCm2, 1));
    const spec: PlotSpec = { id: 'inspect-arf', title: 'Effective area', widthPx: W, heightPx: H, x: { label: 'Energy', unit: 'keV', scale: 'log', toggle: true }, y: { label: 'Effective area', unit: 'cm²', scale: 'log', toggle: true, maxDecades: 4 }, series };
    out.push(figureHtml(spec));
    if (ep) {
      const r = ratio(onGrid(e, e, Array.from(d.specrespCm2)), onGrid(e, ep.energyKeV, ep.effectiveAreaCm2));
      out.push(figureHtml({ id: 'inspect-arf-ratio', title: `Ratio release ${relId} / file`, widthPx: W, heightPx: 200, x: { label: 'Energy', unit: 'keV', scale: 'log', toggle: true }, y: { label: 'Ratio', unit: '', scale: 'linear', toggle: true }, yRef: 1, series: [lineSeries('release / file', e, r, 0)] }));
    }
  }
  if (a.rmf) {
    const d = a.rmf;
    const ch = Array.from(d.ebounds.eMinKeV, (lo, i) => (lo + d.ebounds.eMaxKeV[i]) / 2);
    const energies = det?.profiles.energiesKeV ?? [0.25, 0.5, 0.75].map((f) => d.energLoKeV[Math.floor(f * (d.energLoKeV.length - 1))]);
    const series: SeriesSpec[] = [];
    energies.forEach((eKeV, k) => {
      const i = binOf(d.energLoKeV, d.energHiKeV, eKeV);
      series.push(lineSeries(`file, ${fmt4((d.energLoKeV[i] + d.energHiKeV[i]) / 2)} keV`, ch, Array.from(rmfRow(d, i), (v) => (v > 0 ? v : null)), k, 700));
      if (det) series.push({ ...lineSeries(`release ${relId}, ${fmt4(eKeV)} keV`, det.profiles.channelEnergyKeV, det.profiles.rows[k].map((v) => (v > 0 ? v : null)), k, 700), dash: '5 3', widthPx: 1 });
    });
    out.push(figureHtml({ id: 'inspect-rmf', title: 'Redistribution: rows of the matrix', widthPx: W, heightPx: H, x: { label: 'Channel energy', unit: 'keV', scale: 'linear', toggle: true }, y: { label: 'Probability per channel', unit: '', scale: 'log', toggle: true, maxDecades: 6 }, series }));
    let minSum = Infinity;
    let maxSum = -Infinity;
    for (let i = 0; i < d.rows.length; i++) {
      let s = 0;
      for (const v of d.rows[i].matrix) s += v;
      minSum = Math.min(minSum, s);
      maxSum = Math.max(maxSum, s);
    }
    out.unshift(`<p>${d.energLoKeV.length} energy bins (${fmt4(d.energLoKeV[0])}–${fmt4(d.energHiKeV[d.energHiKeV.length - 1])} keV), ${d.detchans} channels, row sums ${fmt4(minSum)}–${fmt4(maxSum)}, HDUCLAS3 ${esc(d.hduclas3)}.</p>`);
  }
  if (against && !det) out.push(`<p class="muted">The chosen release product was not found in its site document.</p>`);
  return out.join('');
}

async function handle(file: File, against: string, out: HTMLElement) {
  out.innerHTML = `<p>Reading ${esc(file.name)}…</p>`;
  let bytes: Uint8Array;
  try {
    bytes = await maybeGunzip(new Uint8Array(await file.arrayBuffer()));
  } catch (e) {
    out.innerHTML = `<div class="callout danger" id="inspect-error"><strong>Cannot read ${esc(file.name)}:</strong> not a valid gzip stream (${esc((e as Error).message)}).</div>`;
    return;
  }
  const a = analyseBytes(bytes, file.name);
  const parts: string[] = [`<h2>${esc(file.name)} <span class="muted">(${a.kind.toUpperCase()}, ${bytes.length} bytes uncompressed)</span></h2>`];
  if (a.error) parts.push(`<div class="callout danger" id="inspect-error"><strong>Not a readable FITS product.</strong> ${esc(a.error)}</div>`);
  if (a.hdus.length) parts.push(`<p>HDUs (Kiln reader): ${a.hdus.map((h) => `${h.index}: ${esc(h.name || 'PRIMARY')}${h.rows ? ` (${h.rows} rows)` : ''}`).join(' · ')}</p>`);
  if (!a.error) {
    try {
      parts.push('<h3>Plots</h3>', await plots(a, against));
    } catch (e) {
      parts.push(`<p class="callout">Comparison unavailable: ${esc((e as Error).message)}</p>`);
    }
  }
  if (a.checks.length) parts.push('<h3>Checks (as <code>kiln check</code>)</h3>', checksTable(a.checks));
  if (!a.error) {
    const ext = a.arf ? 'SPECRESP' : a.rmf ? (a.hdus.find((h) => /MATRIX/i.test(h.name))?.name.toUpperCase() ?? 'MATRIX') : null;
    const so = await secondOpinion(bytes, ext, a.arf?.energLoKeV ?? a.rmf?.energLoKeV ?? null);
    parts.push(
      '<h3>Second opinion (fitsjs)</h3>',
      so.error
        ? `<p id="inspect-fitsjs">fitsjs could not read the file: ${esc(so.error)}</p>`
        : `<p id="inspect-fitsjs">fitsjs sees ${so.hdus.length} HDUs: ${so.hdus.map((h) => esc(h.name || '(unnamed)')).join(', ')}.${so.energLoMaxRelDiff === null ? '' : ` ENERG_LO agrees with Kiln's reader to ${fmt3(so.energLoMaxRelDiff)} (largest relative difference).`}</p>`,
    );
  }
  out.innerHTML = parts.join('');
  initPlots(out);
}

export function initInspect(): void {
  const input = document.getElementById('inspect-file') as HTMLInputElement | null;
  const drop = document.getElementById('inspect-drop');
  const against = document.getElementById('inspect-against') as HTMLSelectElement | null;
  const out = document.getElementById('inspect-result');
  if (!input || !drop || !against || !out) return;
  let last: File | null = null;
  const go = (f: File | null | undefined) => {
    if (!f) return;
    last = f;
    void handle(f, against.value, out);
  };
  input.addEventListener('change', () => go(input.files?.[0]));
  against.addEventListener('change', () => go(last));
  drop.addEventListener('dragover', (e) => {
    e.preventDefault();
    drop.classList.add('over');
  });
  drop.addEventListener('dragleave', () => drop.classList.remove('over'));
  drop.addEventListener('drop', (e) => {
    e.preventDefault();
    drop.classList.remove('over');
    go(e.dataTransfer?.files[0]);
  });
  drop.addEventListener('keydown', (e) => {
    if (e.key === 'Enter' || e.key === ' ') input.click();
  });
}
