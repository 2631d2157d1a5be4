/**
 * Release page (progressive enhancement): plots built from the site's own data document on the
 * first interaction, profile energy pickers, the epoch choice of the efficiency plot, the
 * validation filter and copy buttons.
 */
import type { RmfData } from '../../generators/response/types.ts';
import type { JoinedDetector } from '../../generators/site-data/split.ts';
import type { ReleaseOverlayDoc } from '../../generators/site-data/types.ts';
import { OVERLAY_FILE } from '../../generators/site-data/paths.ts';
import { componentsPlot, detectorPlots, overlayPlots, PICKED_PROFILE_DASH, profileColour } from '../lib/release-plots.ts';
import { fetchDetector, fetchJson, parseDetectorSrc, parseReleaseSrc } from '../lib/site-fetch.ts';
import { esc, fmt4, type PlotSpec, type SeriesSpec } from '../lib/plot/index.ts';
import { formatBytes } from '../lib/downloads.ts';
import { initPlots, loadNow, replacePlot, updatePlot } from './plots.ts';
import { initCopyButtons as initCopyButtonsIn } from './copy.ts';

/** The FITS reader loads only when a reader adds an energy: a separate chunk, not part of the page. */
const rowReader = () => import('../lib/published-row/index.ts');
/** Published RMFs already read, by URL (each is fetched at most once per page). */
const rmfs = new Map<string, Promise<RmfData>>();

const docs = new Map<string, Promise<{ releaseId: string; det: JoinedDetector; specs: Map<string, PlotSpec> }>>();

/** A detector's documents, fetched when one of its plots is first touched (its section is the unit). */
function siteDoc(src: string) {
  let p = docs.get(src);
  if (!p) {
    const at = parseDetectorSrc(src);
    p = at
      ? fetchDetector(at.releaseId, at.detector, { checks: false }).then((det) => ({ releaseId: at.releaseId, det, specs: detectorPlots(det.site, at.releaseId) }))
      : Promise.reject(new Error(`not a detector data address: ${src}`));
    docs.set(src, p);
    p.catch(() => docs.delete(src));
  }
  return p;
}

/** The overlay plots' specs, built from the release's overlay document (fetched once). */
const overlays = new Map<string, Promise<Map<string, PlotSpec>>>();
function overlaySpecs(src: string): Promise<Map<string, PlotSpec>> {
  let p = overlays.get(src);
  if (!p) {
    // Titles name the release by the key in its address, as the page rendered them.
    p = fetchJson<ReleaseOverlayDoc>(src).then((doc) => overlayPlots(doc, parseReleaseSrc(src) ?? doc.release));
    overlays.set(src, p);
    p.catch(() => overlays.delete(src));
  }
  return p;
}

export function initReleasePlots(root: Document): void {
  initPlots(root, async (fig) => {
    const src = fig.dataset.specSrc!;
    if (src.endsWith(`/${OVERLAY_FILE}`)) return (await overlaySpecs(src)).get(fig.id) ?? null;
    return (await siteDoc(src)).specs.get(fig.id) ?? null;
  });
  root.querySelectorAll<HTMLElement>('.profiles').forEach((box) => {
    const fig = root.getElementById(box.dataset.plot ?? '');
    const pick = box.querySelector<HTMLFieldSetElement>('.profile-pick');
    if (!fig || !pick) return;
    pick.hidden = false;
    // Fetch as soon as the reader comes near the picker, so ticking feels immediate.
    const warm = () => void loadNow(fig);
    pick.addEventListener('pointerenter', warm, { once: true });
    pick.addEventListener('focusin', warm, { once: true });
    pick.addEventListener('change', (ev) => {
      if (!(ev.target as HTMLElement).matches('input[type=checkbox]')) return;
      const on = new Set([...pick.querySelectorAll<HTMLInputElement>('input[type=checkbox]:checked')].map((i) => Number(i.value)));
      void updatePlot(fig, (spec) => spec.series.forEach((s, i) => (s.hidden = !on.has(i))));
    });
    const form = pick.querySelector<HTMLFormElement>('form.profile-add');
    if (form) initProfileAdd(form, fig, pick.querySelector<HTMLElement>('.checks-inline')!);
  });
  root.querySelectorAll<HTMLElement>('.qe-box').forEach((box) => {
    const fig = root.getElementById(box.dataset.plot ?? '');
    const label = box.querySelector<HTMLElement>('.epoch-pick');
    const sel = label?.querySelector('select');
    if (!fig || !label || !sel) return;
    label.hidden = false;
    sel.addEventListener('change', async () => {
      const st = await loadNow(fig);
      if (!st) return;
      const { det } = await siteDoc(fig.dataset.specSrc!);
      replacePlot(fig, componentsPlot(det.site, sel.value));
    });
  });
}

/**
 * "Add any energy": the row of the energy bin containing it, read from the release's own RMF
 * (fetched once, same origin, gunzipped and parsed here), drawn beside the published profiles.
 */
function initProfileAdd(form: HTMLFormElement, fig: HTMLElement, checks: HTMLElement): void {
  const input = form.querySelector<HTMLInputElement>('input[name=energyKeV]')!;
  const button = form.querySelector<HTMLButtonElement>('button')!;
  const status = form.querySelector<HTMLOutputElement>('output')!;
  const det = form.dataset.det ?? '';
  const say = (html: string, error = false) => {
    status.innerHTML = html;
    status.classList.toggle('error', error);
  };
  form.addEventListener('submit', async (ev) => {
    ev.preventDefault();
    const energyKeV = input.valueAsNumber;
    if (!Number.isFinite(energyKeV) || energyKeV <= 0) return say('Enter a photon energy in keV, e.g. 3.21.', true);
    button.disabled = true;
    form.setAttribute('aria-busy', 'true');
    try {
      const doc = await siteDoc(fig.dataset.specSrc!);
      const mod = await rowReader();
      const product = mod.rmfProductOf(doc.det.products, det);
      if (!product) return say(`This release publishes no RMF for detector ${esc(det)}.`, true);
      const url = mod.productUrl(doc.releaseId, product);
      const fname = product.path.replace(/^.*\//, '');
      let rmf = rmfs.get(url);
      if (!rmf) {
        say(`Reading the published RMF, ${formatBytes(product.bytes)}…`);
        rmf = mod.fetchPublishedRmf(url);
        rmfs.set(url, rmf);
        rmf.catch(() => rmfs.delete(url)); // a failed read may be retried
      }
      let data: RmfData;
      try {
        data = await rmf;
      } catch (e) {
        return say(`Could not read the published RMF: ${esc((e as Error).message)}.`, true);
      }
      const [gridLo, gridHi] = mod.energyGridKeV(data);
      const bin = mod.binContaining(data, energyKeV);
      if (bin < 0) return say(`${fmt4(energyKeV)} keV is outside the matrix energy grid of ${esc(fname)}: choose ${fmt4(gridLo)}–${fmt4(gridHi)} keV.`, true);
      const row = mod.rowAtEnergy(data, energyKeV);
      const binText = mod.binRangeText(row.binLoKeV, row.binHiKeV);
      const old = checks.querySelector<HTMLInputElement>(`input[data-bin="${bin}"]`);
      if (old) {
        if (!old.checked) {
          old.checked = true;
          old.dispatchEvent(new Event('change', { bubbles: true }));
        }
        return say(`The bin ${binText} keV is already drawn.`);
      }
      const energies = doc.det.site.profiles.energiesKeV;
      const label = `E = ${fmt4(energyKeV)} keV (bin ${binText} keV)`;
      const series: SeriesSpec = {
        label,
        kind: 'line',
        step: true,
        colour: profileColour(energies, energyKeV),
        dash: PICKED_PROFILE_DASH,
        // Every channel at full precision: the plot shows the file's row, not a rounded copy.
        x: row.channelEnergyKeV,
        y: row.probability.map((v) => (v > 0 ? v : null)),
      };
      let index = -1;
      await updatePlot(fig, (spec) => {
        index = spec.series.push(series) - 1;
      });
      if (index < 0) return say('The plot could not be loaded.', true);
      const box = document.createElement('label');
      box.className = 'picked';
      box.innerHTML = `<input type="checkbox" value="${index}" data-bin="${bin}" data-energy-kev="${energyKeV}" checked> ${esc(fmt4(energyKeV))} <span class="muted">(bin ${esc(binText)})</span>`;
      checks.append(box);
      const csv = URL.createObjectURL(new Blob([mod.rowCsv(row, `${fname}, MATRIX row ${bin + 1}, energy bin ${binText} keV`)], { type: 'text/csv' }));
      const csvName = `${det}-row-${bin + 1}.csv`;
      say(`Drawn: row ${bin + 1} of ${esc(fname)}, bin ${esc(binText)} keV. <a class="row-csv" href="${csv}" download="${esc(csvName)}">Row values (CSV)</a>`);
      input.select();
    } catch (e) {
      say(`Could not add the profile: ${esc((e as Error).message)}.`, true);
    } finally {
      button.disabled = false;
      form.removeAttribute('aria-busy');
    }
  });
}

/** Validation report: filter rows by text and result; groups with no match fold away. */
export function initCheckFilter(root: Document): void {
  const bar = root.querySelector<HTMLElement>('.vfilter');
  const text = root.getElementById('vf-text') as HTMLInputElement | null;
  const status = root.getElementById('vf-status') as HTMLSelectElement | null;
  const count = root.getElementById('vf-count');
  if (!bar || !text || !status || !count) return;
  bar.hidden = false;
  const groups = [...root.querySelectorAll<HTMLDetailsElement>('details.vgroup')];
  const initiallyOpen = groups.map((g) => g.open);
  const apply = () => {
    const q = text.value.trim().toLowerCase();
    const st = status.value;
    let shown = 0;
    groups.forEach((g, gi) => {
      let n = 0;
      g.querySelectorAll<HTMLTableRowElement>('tbody tr').forEach((tr) => {
        const hit = (!st || tr.classList.contains(`check-${st}`)) && (!q || (tr.textContent ?? '').toLowerCase().includes(q));
        tr.hidden = !hit;
        if (hit) n++;
      });
      g.hidden = n === 0;
      g.open = q || st ? n > 0 : initiallyOpen[gi];
      shown += n;
    });
    count.textContent = q || st ? `${shown} matching checks` : '';
  };
  text.addEventListener('input', apply);
  status.addEventListener('change', apply);
}

/** Kept here for the page script; the implementation lives in copy.ts (shared with the finder). */
export function initCopyButtons(root: Document): void {
  initCopyButtonsIn(root, root);
}
