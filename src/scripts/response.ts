/**
 * Response page (main thread): the controls, one Web Worker per model document (created on the
 * first "Build" only, so the generator chunk loads only when asked), progress, errors next to
 * their control, plots, checks and download links of what the worker made. Nothing is uploaded.
 */
import type { ReleaseChoice } from '../lib/response/choices.ts';
import type { FormChoice, Generated } from '../lib/response/generate.ts';
import type { WorkerIn, WorkerOut } from './response-worker.ts';
import { esc } from '../lib/escape.ts';
import { figureHtml, lineSeries, type PlotSpec } from '../lib/plot/index.ts';
import { initPlots } from './plots.ts';

const W = 640;
const H = 260;
/** Fields the generator names in its errors → the control they belong to. */
const FIELD_OF: Record<string, string> = { detector: 'detector', node: 'node', row: 'row', date: 'date', energies: 'energies', 'energy-grid': 'energies', group: 'group' };
/** Log axes of matrix rows show this many decades below the peak, as on the release pages. */
const PROFILE_DECADES = 6;

const $ = <T extends HTMLElement>(id: string) => document.getElementById(id) as T;

let worker: { release: string; w: Worker } | null = null;
let urls: string[] = [];

function divisors(n: number): number[] {
  const out: number[] = [];
  for (let k = 1; k <= n; k++) if (n % k === 0 && n / k >= 16) out.push(k);
  return out;
}

function option(value: string, label: string): HTMLOptionElement {
  const o = document.createElement('option');
  o.value = value;
  o.textContent = label;
  return o;
}

function clearErrors(): void {
  document.querySelectorAll<HTMLElement>('.field-error').forEach((e) => (e.textContent = ''));
}

function showError(field: string | null, message: string): void {
  const slot = field && FIELD_OF[field] ? $(`err-${FIELD_OF[field]}`) : $('err-general');
  slot.textContent = message;
}

function checksHtml(g: Generated): string {
  const n = (s: string) => g.checks.filter((c) => c.status === s).length;
  const bad = g.checks.filter((c) => c.status !== 'pass');
  const rows = bad.map((c) => `<tr><td><span class="st st-${esc(c.status)}">${esc(c.status)}</span></td><td>${esc(c.title)}<br><code class="muted">${esc(c.id)}</code></td><td>${esc(c.product ?? '')}</td><td>${esc(c.message)}</td></tr>`).join('');
  return `<h2>Checks</h2><p id="rsp-checks-summary">${g.checks.length} checks: ${n('pass')} passed, ${n('fail')} failed, ${n('warn')} warnings.</p>` + (rows ? `<div class="table-wrap"><table class="data"><thead><tr><th>Result</th><th>Check</th><th>File</th><th>Message</th></tr></thead><tbody>${rows}</tbody></table></div>` : '');
}

function plotsHtml(g: Generated): string {
  const area: PlotSpec = {
    id: 'rsp-area',
    title: 'Effective area on the chosen date',
    widthPx: W,
    heightPx: H,
    x: { label: 'Energy', unit: 'keV', scale: 'log', toggle: true },
    y: { label: 'Effective area', unit: 'cm²', scale: 'linear', toggle: true },
    series: [lineSeries('ARF', g.area.energyKeV, g.area.areaCm2, 0)],
  };
  const rows: PlotSpec = {
    id: 'rsp-rows',
    title: 'Matrix rows: probability per channel',
    widthPx: W,
    heightPx: H,
    x: { label: 'Channel energy', unit: 'keV', scale: 'linear', toggle: true },
    y: { label: 'Probability', unit: '', scale: 'log', toggle: true, maxDecades: PROFILE_DECADES },
    series: g.rows.map((r, i) => lineSeries(`${r.energyKeV.toFixed(3)} keV`, r.channelKeV, r.probability.map((p) => (p > 0 ? p : null)), i)),
  };
  return figureHtml(area) + figureHtml(rows);
}

function downloadsHtml(g: Generated): string {
  for (const u of urls) URL.revokeObjectURL(u);
  urls = g.files.map((f) => URL.createObjectURL(new Blob([f.bytes as Uint8Array<ArrayBuffer>], { type: 'application/fits' })));
  const rows = g.files
    .map((f, i) => `<tr><td>${esc(f.kind.toUpperCase())}</td><td class="file"><a download="${esc(f.name)}" href="${esc(urls[i])}" data-kind="${esc(f.kind)}">${esc(f.name)}</a></td><td class="num">${f.bytes.length}</td><td><code class="sha">${esc(f.sha256)}</code></td></tr>`)
    .join('');
  return `<h2>Files</h2><div class="table-wrap"><table class="data" id="rsp-files"><thead><tr><th>Kind</th><th>File</th><th class="num">Bytes</th><th>SHA-256</th></tr></thead><tbody>${rows}</tbody></table></div>`;
}

export function initResponsePage(): void {
  const form = document.getElementById('response-form') as HTMLFormElement | null;
  if (!form) return;
  const choices = JSON.parse($('response-choices').textContent ?? '[]') as ReleaseChoice[];
  const rel = $<HTMLSelectElement>('rsp-release');
  const det = $<HTMLSelectElement>('rsp-detector');
  const node = $<HTMLSelectElement>('rsp-node');
  const group = $<HTMLSelectElement>('rsp-group');
  const energies = $<HTMLSelectElement>('rsp-energies');
  const range = $<HTMLInputElement>('rsp-range');
  const edges = $<HTMLTextAreaElement>('rsp-edges');
  const hint = $('rsp-hint');
  const current = () => choices.find((c) => c.id === rel.value)!;
  const currentDet = () => current().detectors.find((d) => d.id === det.value)!;

  const fillNodes = () => {
    const d = currentDet();
    node.replaceChildren(option('', 'whole detector'), ...d.nodes.map((n) => option(n.id, `${n.id} — ${n.name} (${n.readNoiseE} e⁻ RMS)`)));
    const c = current();
    hint.textContent =
      `Valid ${d.validFrom} to ${d.validTo ?? 'open'}; energies within ${c.dataRangeKeV[0]}–${c.dataRangeKeV[1]} keV; ${c.channels} channels` +
      (d.transfers ? `; rows 0–${d.transfers - 1} in bands ${d.rowBands.map((b) => `${b.id} ${b.firstTransfer}–${b.lastTransfer}`).join(', ')}` : '; one region (no nodes or row bands)') +
      `. Model document SHA-256 ${c.modelSha256}.`;
  };
  const fillRelease = () => {
    const c = current();
    det.replaceChildren(...c.detectors.map((d) => option(d.id, `${d.id} — ${d.name}`)));
    group.replaceChildren(...divisors(c.channels).map((k) => option(String(k), k === 1 ? `none (${c.channels} channels)` : `${k} → ${c.channels / k} channels`)));
    range.placeholder = `${c.dataRangeKeV[0]}:${Math.min(10, c.dataRangeKeV[1])}:500`;
    fillNodes();
  };
  rel.addEventListener('change', fillRelease);
  det.addEventListener('change', fillNodes);
  energies.addEventListener('change', () => {
    range.hidden = energies.value !== 'range';
    edges.hidden = energies.value !== 'edges';
  });
  fillRelease();

  form.addEventListener('submit', (ev) => {
    ev.preventDefault();
    clearErrors();
    const c = current();
    if (!worker || worker.release !== c.id) {
      worker?.w.terminate();
      worker = { release: c.id, w: new Worker(new URL('./response-worker.ts', import.meta.url), { type: 'module' }) };
    }
    const f: FormChoice = {
      detector: det.value,
      node: node.value,
      row: $<HTMLInputElement>('rsp-row').value,
      date: $<HTMLInputElement>('rsp-date').value,
      energies: energies.value as FormChoice['energies'],
      rangeText: range.value,
      edgesText: edges.value,
      group: group.value,
      rsp: $<HTMLInputElement>('rsp-rsp').checked,
    };
    const progress = $<HTMLProgressElement>('rsp-progress');
    const phase = $('rsp-phase');
    const button = $<HTMLButtonElement>('rsp-build');
    button.disabled = true;
    progress.hidden = false;
    progress.value = 0;
    const w = worker.w;
    w.onmessage = (m: MessageEvent<WorkerOut>) => {
      const msg = m.data;
      if (msg.type === 'progress') {
        progress.max = msg.total;
        progress.value = msg.done;
        phase.textContent = msg.total > 1 ? `${msg.phase}: ${msg.done} / ${msg.total} energies` : `${msg.phase}…`;
        return;
      }
      button.disabled = false;
      progress.hidden = true;
      if (msg.type === 'error') {
        phase.textContent = '';
        showError(msg.field, msg.message);
        return;
      }
      const g = msg.result;
      phase.textContent = `Built ${g.files.map((x) => x.kind.toUpperCase()).join(', ')} for ${g.region} (epoch ${g.epoch}): ${g.channels} channels × ${g.energyBins} energies in ${(msg.ms / 1000).toFixed(2)} s.`;
      const out = $('rsp-result');
      out.innerHTML = downloadsHtml(g) + plotsHtml(g) + checksHtml(g);
      out.dataset.done = String(Date.now());
      initPlots(out);
    };
    w.onerror = (e) => {
      button.disabled = false;
      progress.hidden = true;
      showError(null, `the worker failed: ${e.message}`);
    };
    w.postMessage({ modelUrl: c.modelUrl, form: f } satisfies WorkerIn);
  });
}
