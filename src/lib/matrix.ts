/**
 * The redistribution matrix picture: MatrixImage.log10 → RGBA pixels (photon energy upwards,
 * channel energy to the right), log colour scale over log10Range, empty cells transparent.
 */
import type { MatrixImage } from '../../generators/site-data/types.ts';
import { colourAt } from './plot/colorbar.ts';

export function matrixPixels(m: MatrixImage): { width: number; height: number; rgba: Uint8Array } {
  const height = m.log10.length;
  const width = height ? m.log10[0].length : 0;
  const [lo, hi] = m.log10Range;
  const rgba = new Uint8Array(width * height * 4);
  for (let e = 0; e < height; e++) {
    const row = m.log10[e];
    const r = height - 1 - e; // highest energy on top
    for (let c = 0; c < width; c++) {
      const v = row[c];
      if (v === null || v < lo) continue;
      const [R, G, B] = colourAt((v - lo) / (hi - lo));
      const o = (r * width + c) * 4;
      rgba[o] = R;
      rgba[o + 1] = G;
      rgba[o + 2] = B;
      rgba[o + 3] = 255;
    }
  }
  return { width, height, rgba };
}
