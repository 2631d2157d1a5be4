/** Download helpers: sizes and the checksum lines `sha256sum -c` reads. */
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
