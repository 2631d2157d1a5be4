/** Finder page: a detector's manifest, then only the file lists (chunks) that can cover the date. */
import type { FinderManifestDoc } from '../../generators/site-data/types.ts';
import { finderPath } from '../../generators/site-data/paths.ts';
import { fetchJson } from '../lib/site-fetch.ts';
import { lookupStep, startLookup, type FinderLookup } from '../lib/finder.ts';
import { esc } from '../lib/plot/format.ts';
import { breakableNameHtml, fileName, formatBytes, shaCellHtml } from '../lib/downloads.ts';
import { initCopyButtons } from './copy.ts';
import { validity } from '../lib/status.ts';

const ISO_DATE = /^\d{4}-\d{2}-\d{2}$/;

export function initFinder(): void {
  const form = document.getElementById('finder-form') as HTMLFormElement | null;
  const det = document.getElementById('finder-detector') as HTMLSelectElement | null;
  const date = document.getElementById('finder-date') as HTMLInputElement | null;
  const node = document.getElementById('finder-node') as HTMLSelectElement | null;
  const rows = document.getElementById('finder-rows') as HTMLSelectElement | null;
  const out = document.getElementById('finder-result');
  const inst = document.getElementById('finder-instrument') as HTMLSelectElement | null;
  const filt = document.getElementById('finder-filter') as HTMLSelectElement | null;
  if (!form || !det || !date || !node || !rows || !out || !inst || !filt) return;
  const q = new URLSearchParams(location.search);
  // Instrument first: only its detectors and filters are offered (ids may repeat across instruments).
  const scope = () => {
    for (const sel of [det, filt]) {
      for (const o of sel.options) {
        o.hidden = o.dataset.instrument !== inst.value;
        o.disabled = o.hidden;
      }
      if (sel.selectedOptions[0]?.disabled) sel.value = [...sel.options].find((o) => !o.disabled)?.value ?? '';
    }
    (filt.closest('label') as HTMLElement | null)?.toggleAttribute('hidden', ![...filt.options].some((o) => !o.disabled));
  };
  if (q.get('instrument')) inst.value = q.get('instrument')!;
  scope();
  const pick = (sel: HTMLSelectElement, v: string | null) => {
    const o = [...sel.options].find((x) => x.value === v && !x.disabled);
    if (o) sel.value = o.value;
  };
  pick(det, q.get('detector'));
  pick(filt, q.get('filter'));
  if (q.get('date') && ISO_DATE.test(q.get('date')!)) date.value = q.get('date')!;
  // The nodes and row bands of the chosen detector (from its option's data attributes), "any" first.
  const fill = (sel: HTMLSelectElement, ids: string[], want: string | null) => {
    sel.replaceChildren(new Option('any', ''), ...ids.map((id) => new Option(id, id)));
    sel.value = want !== null && ids.includes(want) ? want : '';
    (sel.closest('label') as HTMLElement | null)?.toggleAttribute('hidden', ids.length === 0);
  };
  const regions = () => {
    const o = det.selectedOptions[0];
    const list = (s: string | undefined) => (s ? s.split(' ').filter(Boolean) : []);
    fill(node, list(o?.dataset.nodes), node.value || q.get('node'));
    fill(rows, list(o?.dataset.rowBands), rows.value || q.get('rows'));
  };
  regions();
  const hasFilter = () => !(filt.closest('label') as HTMLElement | null)?.hidden && filt.value !== '';

  // Only the chosen detector's manifest and the chunks that can hold a file for the date and
  // position are fetched, a few at a time (lookupStep), whatever the site's size.
  let current = 0;
  const run = async () => {
    const mine = ++current;
    if (!ISO_DATE.test(date.value)) {
      out.innerHTML = '<p class="callout">Enter the observation date as YYYY-MM-DD.</p>';
      return;
    }
    const u = new URL(location.href);
    u.searchParams.set('instrument', inst.value);
    u.searchParams.set('detector', det.value);
    if (hasFilter()) u.searchParams.set('filter', filt.value);
    else u.searchParams.delete('filter');
    u.searchParams.set('date', date.value);
    for (const [k, sel] of [['node', node], ['rows', rows]] as const)
      if (sel.value) u.searchParams.set(k, sel.value);
      else u.searchParams.delete(k);
    history.replaceState(null, '', u);
    const instrument = inst.value;
    // With configurations the manifest is the detector's in the chosen filter: no other filter's file is in it.
    const entry = hasFilter() ? `${det.value}.${filt.value}` : det.value;
    const day = date.value;
    const at = { node: node.value || null, rowBand: rows.value || null };
    let manifest: FinderManifestDoc;
    try {
      manifest = await fetchJson<FinderManifestDoc>(`/data/${finderPath(encodeURIComponent(instrument), encodeURIComponent(entry))}`);
      if (manifest?.schema !== 'kiln/finder-manifest/1' || !Array.isArray(manifest.chunks)) throw new Error(`not a finder manifest (schema ${String(manifest?.schema)}, expected kiln/finder-manifest/1)`);
    } catch (e) {
      if (mine === current) out.innerHTML = `<p class="callout danger" id="finder-error">Could not load the file list of ${esc(det.value)}: ${esc((e as Error).message)}</p>`;
      return;
    }
    const fetchChunk = (c: FinderManifestDoc['chunks'][number]) => fetchJson<unknown>(`/data/${c.path.split('/').map(encodeURIComponent).join('/')}`);
    const step = async (state: FinderLookup) => {
      let next: FinderLookup;
      try {
        next = await lookupStep(manifest, state, fetchChunk, day, at);
      } catch (e) {
        // A missing or bad chunk: say so, and show no list that would look complete without it.
        if (mine === current) out.innerHTML = `<p class="callout danger" id="finder-error">Could not load the file lists of ${esc(det.value)} for ${esc(day)}: ${esc((e as Error).message)}. No result is shown, as it could miss files.</p>`;
        return;
      }
      if (mine === current) render(next);
    };
    const filterText = hasFilter() ? (filt.selectedOptions[0]?.textContent ?? filt.value) : '';
    const where = [filterText ? `filter ${filterText}` : '', at.node ? `node ${at.node}` : '', at.rowBand ? `rows ${at.rowBand}` : ''].filter(Boolean).join(', ');
    const instText = inst.selectedOptions[0]?.textContent?.split(' — ')[0] ?? instrument;
    const detName = det.selectedOptions[0]?.textContent?.split(' — ')[0] ?? det.value;
    const render = (state: FinderLookup) => {
      const { hits } = state;
      const left = state.candidates.length - state.loaded.length;
      const more = left
        ? `<p id="finder-more-wrap"><button type="button" id="finder-more">Load more</button> <span class="muted">${left} more file list${left === 1 ? '' : 's'} of ${esc(det.value)} can hold files for this date, of releases ranked below these.</span></p>`
        : '';
      const bindMore = () => out.querySelector('#finder-more')?.addEventListener('click', () => {
        (out.querySelector('#finder-more') as HTMLButtonElement).disabled = true;
        void step(state);
      });
      if (!hits.length) {
        out.innerHTML = left
          ? `<p class="callout">No file found for ${esc(det.value)} on ${esc(day)} in the first ${state.loaded.length} file lists.</p>${more}`
          : `<p class="callout">No file of any release covers ${esc(det.value)} on ${esc(day)}.</p>`;
        bindMore();
        return;
      }
      const region = (p: (typeof hits)[number]['product']) => [p.node ? `node ${p.node}` : '', p.rowBand ? `rows ${p.rowBand}` : ''].filter(Boolean).join(', ') || 'whole detector';
      const best = hits[0].release;
      const link = (h: (typeof hits)[number], dl = true) => `<a href="/releases/${esc(h.release.key)}/${esc(h.product.path)}"${dl ? ' download' : ''}>${breakableNameHtml(fileName(h.product.path))}</a>`;
      const filterCell = (h: (typeof hits)[number]) => (h.product.filter ? esc(filterText || h.product.filter) : 'as built');
      const hitRows = hits.map(
        (h) =>
          `<tr class="${h.release.key === best.key ? 'best' : ''}"><td data-label="Instrument">${esc(instText)}</td><td data-label="Filter">${filterCell(h)}</td><td data-label="Release"><a href="/releases/${esc(h.release.key)}/">${esc(h.release.id)}</a></td><td data-label="Status"><span class="st st-${h.release.status}">${h.release.status}</span></td><td data-label="Kind">${h.product.kind.toUpperCase()}</td><td data-label="Region">${esc(region(h.product))}</td><td data-label="Epoch">${esc(h.product.epoch)}</td><td data-label="Valid for observations" class="nowrap">${esc(validity(h.product.validFrom, h.product.validTo))}</td><td data-label="File" class="nowrap file">${link(h)}</td><td data-label="Size" class="num">${formatBytes(h.product.bytes)}</td><td data-label="SHA-256">${shaCellHtml(h.product.sha256, h.product.path)}</td><td data-label="Note" class="note${h.warning ? '' : ' empty'}">${h.warning ? `<span><span class="st st-warn">warning</span> ${esc(h.warning)}</span>` : ''}</td></tr>`,
      );
      const bestFiles = hits.filter((h) => h.release.key === best.key);
      const bestWarn = hits[0].warning ? `<p class="callout danger">${esc(hits[0].warning)} No published or candidate release covers this date.</p>` : '';
      const nRel = new Set(hits.map((h) => h.release.key)).size;
      out.innerHTML =
        `<h2>Files for ${esc(detName)} (${esc(det.value)})${where ? `, ${esc(where)}` : ''} on ${esc(day)}</h2>${bestWarn}` +
        (new Set(bestFiles.filter((h) => h.product.kind !== 'arf').map((h) => region(h.product))).size > 1 ? '<p class="callout">This release has a matrix per readout region: choose the node (and row band) where your source fell.</p>' : '') +
        `<p class="callout info" id="finder-best">Use release <a href="/releases/${esc(best.key)}/"><strong>${esc(best.id)}</strong></a> of ${esc(instText)} (${esc(best.status)}): ${bestFiles.map((h) => `${h.product.kind.toUpperCase()} ${link(h)}`).join(' and ')}.</p>` +
        `<p>${hits.length} file${hits.length === 1 ? '' : 's'} in ${nRel} release${nRel === 1 ? '' : 's'} cover this date${left ? ' in the file lists loaded so far' : ''}; the recommended ones are highlighted.</p>` +
        `<div class="table-wrap"><table class="data stack" id="finder-hits"><thead><tr><th>Instrument</th><th>Filter</th><th>Release</th><th>Status</th><th>Kind</th><th>Region</th><th>Epoch</th><th>Valid for observations</th><th>File</th><th class="num">Size</th><th>SHA-256</th><th>Note</th></tr></thead><tbody>${hitRows.join('')}</tbody></table></div>` +
        more;
      initCopyButtons(out);
      bindMore();
    };
    await step(startLookup(manifest, day, at));
  };
  form.addEventListener('submit', (e) => {
    e.preventDefault();
    void run();
  });
  inst.addEventListener('change', () => {
    scope();
    regions();
    void run();
  });
  filt.addEventListener('change', () => void run());
  det.addEventListener('change', () => {
    regions();
    void run();
  });
  node.addEventListener('change', () => void run());
  rows.addEventListener('change', () => void run());
  date.addEventListener('change', () => void run());
  if (q.get('date')) void run();
}
