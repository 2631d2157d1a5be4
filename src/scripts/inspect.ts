/** Inspect page: local file → project reader + checks (+ fitsjs) → tables and plots. No uploads. */
import type { Check, DetectorSite } from '../../generators/site-data/types.ts';
import { fetchDetector } from '../lib/site-fetch.ts';
import { analyseBytes, binOf, maybeGunzip, rmfRow, secondOpinion, type Analysis } from '../lib/inspect/index.ts';
import { onGrid, ratio } from '../lib/compare/interp.ts';
import { decimate, esc, figureHtml, fmt3, fmt4, lineSeries, MAX_LINE_POINTS, roundSig, type PlotSpec, type SeriesSpec } from '../lib/plot/index.ts';
import { initPlots } from './plots.ts';
import { defaultProfileIndices, profileRange } from '../lib/release-plots.ts';

const ORDER = ['fail', 'warn', 'review', 'pass'];
const W = 640;
const H = 280;
const EV_PER_KEV = 1000;
/** Matrix rows drawn without a release to compare with: at these fractions of the file's energy grid. */
const FILE_ROW_FRACTIONS = [0.25, 0.5, 0.75];
/** Points per drawn row: the channel grid (~1000) thinned for display, peaks kept. */
const PROFILE_POINTS = 700;
/** Log-probability axes of matrix rows show six decades below the peak, as on the release pages. */
const PROFILE_DECADES = 6;
/** The site documents round curves to four significant digits (generators/pipeline/site-detector.ts). */
const SITE_CURVE_DIGITS = 4;
/** Digits kept for a ratio series (the default four would show 1e-4 steps). */
const RATIO_DIGITS = 6;

/** A ratio curve kept to RATIO_DIGITS (lineSeries rounds to four), thinned like the other curves. */
function preciseSeries(label: string, x: number[], y: (number | null)[]): SeriesSpec {
  const d = decimate(x, [y], MAX_LINE_POINTS);
  return { ...lineSeries(label, [], [], 0), x: d.x.map((v) => roundSig(v, 6) as number), y: d.ys[0].map((v) => roundSig(v, RATIO_DIGITS)) };
}

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
    (open.length ? `<div class="table-wrap"><table class="data" id="inspect-checks">${head}<tbody>${checksRows(open)}</tbody></table></div>` : '<p>No failures, warnings or items to review.</p>') +
    (passed.length ? `<details><summary>${passed.length} passed checks</summary><div class="table-wrap"><table class="data" id="inspect-passed">${head}<tbody>${checksRows(passed)}</tbody></table></div></details>` : '')
  );
}

/** The chosen detector of a release: its model, the one epoch wanted and its profiles. */
async function releaseDetector(id: string, detector: string, epoch: string): Promise<DetectorSite | undefined> {
  try {
    return (await fetchDetector(id, detector, { checks: false, epochs: epoch === 'all' ? [] : [epoch] })).site;
  } catch {
    return undefined;
  }
}

/** One line about an RMF's grids and row sums, read from the file. */
function rmfSummary(a: Analysis): string {
  const d = a.rmf;
  if (!d) return '';
  let minSum = Infinity;
  let maxSum = -Infinity;
  for (let i = 0; i < d.rows.length; i++) {
    let s = 0;
    for (const v of d.rows[i].matrix) s += v;
    minSum = Math.min(minSum, s);
    maxSum = Math.max(maxSum, s);
  }
  return `<p id="inspect-summary">${d.energLoKeV.length} energy bins (${fmt4(d.energLoKeV[0])}–${fmt4(d.energHiKeV[d.energHiKeV.length - 1])} keV), ${d.detchans} channels (${fmt4(d.ebounds.eMinKeV[0])}–${fmt4(d.ebounds.eMaxKeV[d.ebounds.eMaxKeV.length - 1])} keV), row sums ${fmt4(minSum)}–${fmt4(maxSum)}, HDUCLAS3 ${esc(d.hduclas3)}.</p>`;
}

async function plots(a: Analysis, against: string): Promise<string> {
  const [relId, , detId, epochId] = against ? against.split('|') : ['', '', '', ''];
  const det = relId && detId ? await releaseDetector(relId, detId, epochId ?? 'all') : undefined;
  const prod = det ? { epoch: epochId } : undefined;
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
      out.push(
        figureHtml({
          id: 'inspect-arf-ratio',
          title: `Effective area ratio: release ${relId} ${det!.id} ${ep.id} / this file`,
          widthPx: W,
          heightPx: 200,
          x: { label: 'Energy', unit: 'keV', scale: 'log', toggle: true },
          y: { label: 'Ratio release / file', unit: '', scale: 'linear', toggle: true },
          yRef: 1,
          series: [preciseSeries(`release ${relId} / file`, e, r)],
          note: `The release curve comes from its site document, rounded to ${SITE_CURVE_DIGITS} significant digits: departures from 1 below about ${fmt3(0.5 * 10 ** (1 - SITE_CURVE_DIGITS))} are that rounding.`,
        }),
      );
    }
  }
  if (a.rmf) {
    const d = a.rmf;
    const ch = Array.from(d.ebounds.eMinKeV, (lo, i) => (lo + d.ebounds.eMaxKeV[i]) / 2);
    // Three rows (lowest, middle, highest of the release's profile energies, else of the file's
    // grid): the file's row solid, the release's dashed in the same colour.
    const picks = det ? defaultProfileIndices(det.profiles.energiesKeV.length) : [];
    const energies = det ? picks.map((k) => det.profiles.energiesKeV[k]) : FILE_ROW_FRACTIONS.map((f) => d.energLoKeV[Math.floor(f * (d.energLoKeV.length - 1))]);
    const series: SeriesSpec[] = [];
    const fileRows: number[][] = [];
    energies.forEach((eKeV, k) => {
      const i = binOf(d.energLoKeV, d.energHiKeV, eKeV);
      const row = Array.from(rmfRow(d, i));
      fileRows.push(row);
      series.push({ ...lineSeries(`file, bin at ${fmt4((d.energLoKeV[i] + d.energHiKeV[i]) / 2)} keV`, ch, row.map((v) => (v > 0 ? v : null)), k, PROFILE_POINTS), dash: undefined });
      if (det) series.push({ ...lineSeries(`release ${relId}, ${fmt4(eKeV)} keV`, det.profiles.channelEnergyKeV, det.profiles.rows[picks[k]].map((v) => (v > 0 ? v : null)), k, PROFILE_POINTS), dash: '5 3', widthPx: 1.2 });
    });
    let peak = 0;
    for (const row of fileRows) for (const v of row) peak = Math.max(peak, v);
    const xRange = profileRange({ channelEnergyKeV: ch, energiesKeV: energies, rows: fileRows }, peak / 10 ** PROFILE_DECADES);
    out.push(
      figureHtml({
        id: 'inspect-rmf',
        title: det ? `Rows of the matrix: this file (solid) and release ${relId} ${det.id} (dashed)` : 'Rows of the matrix',
        widthPx: W,
        heightPx: H,
        x: { label: 'Channel energy', unit: 'keV', scale: 'linear', toggle: true, domain: xRange },
        y: { label: 'Probability per channel', unit: '', scale: 'log', toggle: true, maxDecades: PROFILE_DECADES },
        series,
        note: det ? `The file's row is the energy bin containing each release profile energy, so the two can differ by up to one bin (${fmt3(((d.energHiKeV[0] - d.energLoKeV[0]) * EV_PER_KEV))} eV wide at the low end).` : undefined,
      }),
    );
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
  const gz = bytes.length !== file.size;
  const kind = a.kind === 'unknown' ? 'kind unknown' : a.kind.toUpperCase();
  const parts: string[] = [`<h2>${esc(file.name)} <span class="muted">(${kind}, ${bytes.length} bytes${gz ? ` after gunzip, ${file.size} compressed` : ''})</span></h2>`];
  if (a.error) parts.push(`<div class="callout danger" id="inspect-error"><strong>Not a readable FITS product.</strong> ${esc(a.error)}</div>`);
  if (a.hdus.length) parts.push(rmfSummary(a), `<p>HDUs (Kiln reader): ${a.hdus.map((h) => `${h.index}: ${esc(h.name || 'PRIMARY')}${h.rows ? ` (${h.rows} rows)` : ''}`).join(' · ')}</p>`);
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
