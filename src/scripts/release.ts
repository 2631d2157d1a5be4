/** Release page: profile energy pickers and copy buttons (progressive enhancement). */
import { initPlots, updatePlot } from './plots.ts';

export function initProfilePickers(root: Document): void {
  initPlots(root);
  root.querySelectorAll<HTMLElement>('.profiles').forEach((box) => {
    const fig = root.getElementById(box.dataset.plot ?? '');
    const pick = box.querySelector<HTMLFieldSetElement>('.profile-pick');
    if (!fig || !pick) return;
    pick.hidden = false;
    pick.addEventListener('change', () => {
      const on = new Set([...pick.querySelectorAll<HTMLInputElement>('input:checked')].map((i) => Number(i.value)));
      updatePlot(fig, (spec) => spec.series.forEach((s, i) => (s.hidden = !on.has(i))));
    });
  });
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
