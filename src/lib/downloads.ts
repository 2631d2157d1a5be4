/** Download helpers: sizes and the checksum lines `sha256sum -c` reads. */
import { esc as escAttr } from './escape.ts';
import type { ManifestFile } from '../../generators/site-data/types.ts';

/** File name inside the release's files/ directory. */
export const fileName = (path: string): string => path.replace(/^files\//, '');

/** "<sha256>  <name>" per file (two spaces: text mode in GNU coreutils' format). */
export const checksumLines = (files: Pick<ManifestFile, 'path' | 'sha256'>[]): string =>
  files.map((f) => `${f.sha256}  ${fileName(f.path)}`).join('\n');

const KIB = 1024;
export function formatBytes(n: number): string {
  if (n < KIB) return `${n} B`;
  if (n < KIB * KIB) return `${(n / KIB).toFixed(1)} KiB`;
  return `${(n / KIB / KIB).toFixed(2)} MiB`;
}


/**
 * Table cell content for a file's SHA-256: the full value stays in the element (select-and-copy,
 * find in page, print show all of it) and in its title; the stylesheet shortens it on screen with
 * an ellipsis (it unfolds on focus); the copy button appears where scripts run.
 */
export function shaCellHtml(sha256: string, path: string): string {
  const sha = escAttr(sha256);
  return (
    `<div class="sha-cell"><code class="hash hash-short" tabindex="0" title="${sha}">${sha}</code>` +
    `<button type="button" class="copy" data-copy="${sha}" aria-label="Copy SHA-256 of ${escAttr(fileName(path))}" hidden>copy</button></div>`
  );
}

/** A file name as HTML with line-break opportunities after "_" (narrow tables wrap between parts). */
export const breakableNameHtml = (name: string): string => escAttr(name).replace(/_/g, '_<wbr>');
