/**
 * Compare page: the reader picks A and B; the documents come from the site's own /data/ copies,
 * the body is rendered with the same code as the build-time default, and the URL keeps the choice.
 */
import type { ReleaseSite, ValidationReport } from '../../generators/site-data/types.ts';
import { compareHtml } from '../lib/compare/index.ts';
import { initPlots } from './plots.ts';

const cache = new Map<string, Promise<unknown>>();
function getJson<T>(path: string): Promise<T> {
  if (!cache.has(path))
    cache.set(
      path,
      fetch(path).then((r) => {
        if (!r.ok) throw new Error(`${path}: HTTP ${r.status}`);
        return r.json();
      }),
    );
  return cache.get(path) as Promise<T>;
}

export function initCompare(): void {
  const selA = document.getElementById('sel-a') as HTMLSelectElement | null;
  const selB = document.getElementById('sel-b') as HTMLSelectElement | null;
  const body = document.getElementById('compare-body');
  const status = document.getElementById('compare-status');
  if (!selA || !selB || !body || !status) return;
  const ids = [...selA.options].map((o) => o.value);
  let shown = `${selA.value}|${selB.value}`;

  async function show(a: string, b: string, push: boolean) {
    selA!.value = a;
    selB!.value = b;
    if (push) {
      const u = new URL(location.href);
      u.searchParams.set('a', a);
      u.searchParams.set('b', b);
      history.replaceState(null, '', u);
    }
    if (`${a}|${b}` === shown) return;
    status!.textContent = `Loading ${b} against ${a}…`;
    try {
      const [sa, sb, va, vb] = await Promise.all([
        getJson<ReleaseSite>(`/data/releases/${encodeURIComponent(a)}/site.json`),
        getJson<ReleaseSite>(`/data/releases/${encodeURIComponent(b)}/site.json`),
        getJson<ValidationReport>(`/data/releases/${encodeURIComponent(a)}/validation.json`),
        getJson<ValidationReport>(`/data/releases/${encodeURIComponent(b)}/validation.json`),
      ]);
      body!.innerHTML = compareHtml(sa, sb, va, vb);
      initPlots(body!);
      shown = `${a}|${b}`;
      status!.innerHTML = '';
      status!.append(`Showing B = ${b} against A = ${a}.${a === b ? ' (Same release on both sides: every ratio is 1 and every difference 0.)' : ''}`);
    } catch (e) {
      status!.textContent = `Could not load the documents: ${(e as Error).message}`;
    }
  }

  const q = new URLSearchParams(location.search);
  const qa = q.get('a');
  const qb = q.get('b');
  if (qa && qb && ids.includes(qa) && ids.includes(qb)) void show(qa, qb, false);
  else if (qa || qb) status.textContent = `Unknown release in the address (${qa ?? '—'}, ${qb ?? '—'}); showing the default pair.`;
  const onChange = () => void show(selA.value, selB.value, true);
  selA.addEventListener('change', onChange);
  selB.addEventListener('change', onChange);
}
