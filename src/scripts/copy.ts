/**
 * Copy buttons: `button.copy` with data-copy (the text itself) or data-copy-from (an element id).
 * The buttons ship hidden and appear only where this script runs (no JavaScript, no button).
 */
const FEEDBACK_MS = 1500; // long enough to read "copied", short enough not to linger

export function initCopyButtons(root: ParentNode, doc: Document = document): void {
  root.querySelectorAll<HTMLButtonElement>('button.copy').forEach((b) => {
    if (b.dataset.copyReady) return;
    b.dataset.copyReady = '1';
    b.hidden = false;
    b.addEventListener('click', async () => {
      const text = b.dataset.copy ?? doc.getElementById(b.dataset.copyFrom ?? '')?.textContent ?? '';
      const label = b.textContent;
      try {
        await navigator.clipboard.writeText(text);
        b.textContent = 'copied';
      } catch {
        b.textContent = 'select and copy manually';
      }
      setTimeout(() => (b.textContent = label), FEEDBACK_MS);
    });
  });
}
