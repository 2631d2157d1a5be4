/**
 * Release page (progressive enhancement): plots built from the site's own data document on the
 * first interaction, profile energy pickers, the epoch choice of the efficiency plot, the
 * validation filter and copy buttons.
 */
import type { ReleaseSite } from '../../generators/site-data/types.ts';
import { componentsPlot, releasePlots } from '../lib/release-plots.ts';
import type { PlotSpec } from '../lib/plot/index.ts';
import { initPlots, loadNow, replacePlot, updatePlot } from './plots.ts';

const docs = new Map<string, Promise<{ site: ReleaseSite; specs: Map<string, PlotSpec> }>>();

function siteDoc(src: string) {
  let p = docs.get(src);
  if (!p) {
    p = fetch(src)
      .then((r) => {
        if (!r.ok) throw new Error(`${src}: HTTP ${r.status}`);
        return r.json() as Promise<ReleaseSite>;
      })
      .then((site) => ({ site, specs: releasePlots(site) }));
    docs.set(src, p);
  }
  return p;
}

export function initReleasePlots(root: Document): void {
  initPlots(root, async (fig) => (await siteDoc(fig.dataset.specSrc!)).specs.get(fig.id) ?? null);
  root.querySelectorAll<HTMLElement>('.profiles').forEach((box) => {
    const fig = root.getElementById(box.dataset.plot ?? '');
    const pick = box.querySelector<HTMLFieldSetElement>('.profile-pick');
    if (!fig || !pick) return;
    pick.hidden = false;
    // Fetch as soon as the reader comes near the picker, so ticking feels immediate.
    const warm = () => void loadNow(fig);
    pick.addEventListener('pointerenter', warm, { once: true });
    pick.addEventListener('focusin', warm, { once: true });
    pick.addEventListener('change', () => {
      const on = new Set([...pick.querySelectorAll<HTMLInputElement>('input:checked')].map((i) => Number(i.value)));
      void updatePlot(fig, (spec) => spec.series.forEach((s, i) => (s.hidden = !on.has(i))));
    });
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
      const { site } = await siteDoc(fig.dataset.specSrc!);
      const det = site.detectors.find((d) => d.id === box.dataset.det);
      if (det) replacePlot(fig, componentsPlot(det, sel.value));
    });
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

export function initCopyButtons(root: Document): void {
  root.querySelectorAll<HTMLButtonElement>('button.copy').forEach((b) => {
    b.hidden = false;
    b.addEventListener('click', async () => {
      const text = b.dataset.copy ?? root.getElementById(b.dataset.copyFrom ?? '')?.textContent ?? '';
      const label = b.textContent;
      try {
        await navigator.clipboard.writeText(text);
        b.textContent = 'copied';
      } catch {
        b.textContent = 'select and copy manually';
      }
      setTimeout(() => (b.textContent = label), 1500);
    });
  });
}
