/**
 * Compare page: the reader picks A and B (and, for instruments with many detectors, one detector);
 * only the shown detectors' documents are fetched from the site's /data/ copies, the body is
 * rendered with the same code as the build-time default, and the URL keeps the choice.
 */
import { areaPath, checksPath, modelPath, siteDataBase } from '../../generators/site-data/paths.ts';
import { compareHtml, compareSide, shownDetectors, type CompareDetectorDocs } from '../lib/compare/index.ts';
import { fetchJson, fetchSummary } from '../lib/site-fetch.ts';
import type { ReleaseSummaryDoc } from '../../generators/site-data/types.ts';
import { initPlots } from './plots.ts';

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
      body!.innerHTML = compareHtml(A.site, B.site, A.report, B.report);
      initPlots(body!);
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
  else if (qa || qb || qd) status.textContent = `Unknown release or detector in the address (${qa ?? '—'}, ${qb ?? '—'}${qd ? `, ${qd}` : ''}); showing the default pair.`;
  const onChange = () => void show(selA.value, selB.value, detOf(), true);
  selA.addEventListener('change', onChange);
  selB.addEventListener('change', onChange);
  selDet?.addEventListener('change', onChange);
}
