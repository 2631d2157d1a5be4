/**
 * Compare page: the reader picks A and B (and, for instruments with many detectors, one detector);
 * only the shown detectors' documents are fetched from the site's /data/ copies, the body is
 * rendered with the same code as the build-time default, and the URL keeps the choice.
 */
import { areaPath, checksPath, modelPath, siteDataBase } from '../../generators/site-data/paths.ts';
import { compareHtml, compareSide, shownDetectors, type CompareDetectorDocs } from '../lib/compare/index.ts';
import { fetchJson, fetchSummary } from '../lib/site-fetch.ts';
import { esc } from '../lib/escape.ts';
import { crossInstrumentNote } from '../lib/compare/render.ts';
import type { ReleaseSummaryDoc } from '../../generators/site-data/types.ts';
import { initPlots } from './plots.ts';
import { impactTablesHtml, prebuiltImpactHtml } from '../lib/compare/impact.ts';
import type { ReleaseSpectral } from '../../generators/site-data/types.ts';
import type { ImpactWorkerIn, ImpactWorkerOut } from './impact-worker.ts';

/** The impact section for the shown pair: the build's numbers when it computed this pair, else a button that computes them here, off the main thread. */
function impactFor(sa: ReleaseSummaryDoc, sb: ReleaseSummaryDoc, dets: string[], da: CompareDetectorDocs[], db: CompareDetectorDocs[]): void {
  const body = document.getElementById('impact-body');
  const controls = document.getElementById('impact-controls');
  const run = document.getElementById('impact-run') as HTMLButtonElement | null;
  const progress = document.getElementById('impact-progress') as HTMLProgressElement | null;
  const phase = document.getElementById('impact-phase');
  if (!body || !controls || !run || !progress || !phase) return;
  const [a, b] = [sa.id, sb.id];
  controls.hidden = true;
  phase.textContent = '';
  const say = (html: string) => (body.innerHTML = html);
  if (a === b) return void say('<p class="muted">Same release on both sides: no change to assess.</p>');
  if (sa.instrument !== sb.instrument) return void say(`<p class="muted">${esc(a)} and ${esc(b)} are releases of different instruments: their reference sources are not comparable.</p>`);
  fetchJson<ReleaseSpectral>(siteDataBase(b) + 'spectral.json').then(
    (sp) => {
      if (sp.comparedWith === a) return void say(prebuiltImpactHtml(sp, a, b, dets));
      say(`<p>The build computed the impact of ${esc(b)} against ${esc(sp.comparedWith ?? 'no release')} only. For this pair it can be computed here, in this browser, from the two releases' published files (a few seconds per detector and source; nothing is uploaded).</p>`);
      controls.hidden = false;
      run.disabled = false;
      run.onclick = () => {
        run.disabled = true;
        progress.hidden = false;
        progress.removeAttribute('value');
        const w = new Worker(new URL('./impact-worker.ts', import.meta.url), { type: 'module' });
        w.onmessage = (m: MessageEvent<ImpactWorkerOut>) => {
          const msg = m.data;
          if (msg.type === 'progress') {
            progress.max = Math.max(1, msg.total);
            progress.value = msg.done;
            phase.textContent = msg.total > 1 ? `${msg.phase} (${msg.done} / ${msg.total})` : `${msg.phase}…`;
            return;
          }
          w.terminate();
          progress.hidden = true;
          run.disabled = false;
          if (msg.type === 'error') return void (phase.textContent = `Could not compute the impact: ${msg.message}`);
          phase.textContent = `Computed in this browser in ${(msg.ms / 1000).toFixed(1)} s.`;
          body.dataset.done = String(Date.now());
          say(impactTablesHtml(msg.impact, sp, a, b, `Computed in this browser from the published files of ${a} and ${b}.`));
          // Every number of the tables, unrounded, for the reader's records (made here, nothing fetched).
          const link = document.createElement('a');
          link.id = 'impact-json';
          link.download = `impact-${b}-vs-${a}.json`;
          link.href = URL.createObjectURL(new Blob([JSON.stringify({ schema: 'kiln/impact/1', newer: b, older: a, impact: msg.impact }, null, 2)], { type: 'application/json' }));
          link.textContent = 'Download these numbers (JSON)';
          phase.append(' ', link);
        };
        w.onerror = (e) => {
          progress.hidden = true;
          run.disabled = false;
          phase.textContent = `Could not compute the impact: the worker failed (${e.message})`;
        };
        const products = (docs: CompareDetectorDocs[]) => docs.flatMap((d) => d.model.products);
        w.postMessage({
          elementsUrl: siteDataBase(b) + 'spectral-elements.json',
          request: { newer: { id: b, products: products(db) }, older: { id: a, products: products(da) }, spectral: { sources: sp.sources, bands: sp.bands, tolerance: sp.tolerance }, detectors: dets },
        } satisfies ImpactWorkerIn);
      };
    },
    () => say(`<p class="muted">Release ${esc(b)} has no reference sources (no spectral.json).</p>`),
  );
}

async function sideDocs(s: ReleaseSummaryDoc, dets: string[]): Promise<CompareDetectorDocs[]> {
  const base = siteDataBase(s.id);
  const present = dets.filter((d) => s.detectors.some((x) => x.id === d));
  return Promise.all(
    present.map(async (d) => {
      const [model, area, checks] = await Promise.all([fetchJson(base + modelPath(d)), fetchJson(base + areaPath(d)), fetchJson(base + checksPath(d))]);
      return { model, area, checks } as CompareDetectorDocs;
    }),
  );
}

export function initCompare(): void {
  const form = document.getElementById('compare-form');
  const selA = document.getElementById('sel-a') as HTMLSelectElement | null;
  const selB = document.getElementById('sel-b') as HTMLSelectElement | null;
  const selDet = document.getElementById('sel-det') as HTMLSelectElement | null;
  const body = document.getElementById('compare-body');
  const status = document.getElementById('compare-status');
  if (!form || !selA || !selB || !body || !status) return;
  const inlineMax = Number(form.dataset.inlineDetectors ?? '0');
  const ids = [...selA.options].map((o) => o.value);
  const detOf = () => (selDet ? selDet.value : null);
  let shown = `${selA.value}|${selB.value}|${detOf() ?? ''}`;

  async function show(a: string, b: string, det: string | null, push: boolean) {
    selA!.value = a;
    selB!.value = b;
    if (selDet && det) selDet.value = det;
    if (push) {
      const u = new URL(location.href);
      u.searchParams.set('a', a);
      u.searchParams.set('b', b);
      if (selDet && det) u.searchParams.set('det', det);
      history.replaceState(null, '', u);
    }
    const key = `${a}|${b}|${det ?? ''}`;
    if (key === shown) return;
    status!.textContent = `Loading ${b} against ${a}…`;
    try {
      const [sa, sb] = await Promise.all([fetchSummary(a), fetchSummary(b)]);
      const dets = shownDetectors(sa, sb, det, inlineMax);
      const [da, db] = await Promise.all([sideDocs(sa, dets), sideDocs(sb, dets)]);
      const A = compareSide(sa, da);
      const B = compareSide(sb, db);
      body!.innerHTML = crossInstrumentNote(sa, sb) + compareHtml(A.site, B.site, A.report, B.report);
      initPlots(body!);
      impactFor(sa, sb, dets, da, db);
      shown = key;
      status!.innerHTML = '';
      status!.append(`Showing B = ${b} against A = ${a}${dets.length === 1 && selDet ? `, detector ${dets[0]}` : ''}.${a === b ? ' (Same release on both sides: every ratio is 1 and every difference 0.)' : ''}`);
    } catch (e) {
      status!.textContent = `Could not load the documents: ${(e as Error).message}`;
    }
  }

  const q = new URLSearchParams(location.search);
  const qa = q.get('a');
  const qb = q.get('b');
  const qd = q.get('det');
  const detOk = !qd || !selDet || [...selDet.options].some((o) => o.value === qd);
  if (qa && qb && ids.includes(qa) && ids.includes(qb) && detOk) void show(qa, qb, qd ?? detOf(), false);
  else {
    if (qa || qb || qd) status.textContent = `Unknown release or detector in the address (${qa ?? '—'}, ${qb ?? '—'}${qd ? `, ${qd}` : ''}); showing the default pair.`;
    void initialImpact(selA.value, selB.value, detOf(), inlineMax);
  }
  const onChange = () => void show(selA.value, selB.value, detOf(), true);
  selA.addEventListener('change', onChange);
  selB.addEventListener('change', onChange);
  selDet?.addEventListener('change', onChange);
}

/** The default pair's impact controls (its tables, when the build computed them, are in the page already). */
async function initialImpact(a: string, b: string, det: string | null, inlineMax: number): Promise<void> {
  try {
    const [sa, sb] = await Promise.all([fetchSummary(a), fetchSummary(b)]);
    const dets = shownDetectors(sa, sb, det, inlineMax);
    const [da, db] = await Promise.all([sideDocs(sa, dets), sideDocs(sb, dets)]);
    impactFor(sa, sb, dets, da, db);
  } catch {
    /* the static page keeps what the build rendered */
  }
}
